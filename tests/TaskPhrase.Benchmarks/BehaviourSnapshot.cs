using System.Globalization;
using System.Text;
using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>snapshot</c>: prints every observable field of many resolutions (scores as exact float bits), so a
/// performance change can be shown to change nothing: run it before and after, and diff the two files.
/// Covers the Harbor Street probe suites with the real model under every scoring strategy, through both
/// <see cref="TaskResolver.Resolve"/> and <see cref="TaskResolver.ResolveMany"/>, and <see cref="TaskResolver.Rank"/>
/// over synthetic registries of random vectors large enough for the quantised screen (2,000 phrases in 200 tasks,
/// and 1,000 one-phrase tasks).
/// </summary>
internal static class BehaviourSnapshot
{
    public static void Run(IEnumerable<string> args)
    {
        _ = new HarnessArguments(args);
        var output = Console.Out;
        using (var setup = new ModelSetup())
        {
            var utterances = new[] { "probes.csv", "probes-holdout.csv" }
                .SelectMany(f => ProbeSuite.Load(Path.Combine(BenchmarkPaths.RepoRoot, "examples", "harbor-street", f)).Cases)
                .Select(c => c.Utterance)
                .Concat(["", "  \t", "water the basil", "  Water the BASIL. ", "asdf qwer zxcv", "don't water the basil", "throw the kettle at the window",
                    "please watr the bazil", "could you fech my blankit", "put the kettle on my hand", "hit my head with the remote",
                    "Water The Basil On The Windowsill Please", "water the basil and boil the kettle", "\u201cwater\u201d   the  basil!", "stop the kettle",
                    "1234 5678", "!!!", "basil basil basil", new string('a', 3000)])
                .ToList();
            foreach (var strategy in Enum.GetValues<ScoringStrategy>())
            {
                var resolver = TaskResolver.Create(setup.Registry, setup.Embedder, new ResolverOptions { Scoring = strategy });
                foreach (var u in utterances) output.WriteLine($"harbor {strategy} single {Describe(resolver.Resolve(u))}");
                foreach (var r in resolver.ResolveMany(utterances)) output.WriteLine($"harbor {strategy} many {Describe(r)}");
                foreach (var u in utterances.Take(40)) output.WriteLine($"harbor {strategy} rank {Describe(resolver.Rank(u, 7))}");
            }
        }
        foreach (var (tasks, perTask) in new[] { (200, 10), (1000, 1) })
        {
            var registry = SyntheticRegistry.Direct(tasks, perTask);
            var generator = new HashedEmbeddingGenerator();
            var random = new Random(tasks);
            var queries = new List<float[]>();
            for (int i = 0; i < 200; i++)
            {
                var q = new float[384];
                HashedEmbeddingGenerator.Fill(random, q);
                queries.Add(q);
            }
            // Queries equal to a phrase's own vector: the nearest phrase is then certain and near-ties are likely.
            foreach (var p in registry.Tasks.Take(20).SelectMany(t => t.Phrases)) queries.Add(HashedEmbeddingGenerator.VectorOf(p, 384));
            foreach (var strategy in Enum.GetValues<ScoringStrategy>())
            {
                var resolver = TaskResolver.Create(registry, generator, new ResolverOptions { Scoring = strategy, UnintelligibleGuard = false });
                foreach (var q in queries)
                {
                    generator.Query = q;
                    output.WriteLine($"synthetic {tasks}x{perTask} {strategy} {Describe(resolver.Rank("query", 5))}");
                }
                generator.Query = null;
            }
        }
    }

    private static string Describe(Resolution.Resolution r)
    {
        var sb = new StringBuilder();
        sb.AppendJoin('|', r.Utterance, r.Normalized, r.Outcome, r.Reason, r.Detail, r.Task?.Id, r.Phrase, Bits(r.Score), Bits(r.Margin),
            r.ExactMatch, r.Truncated, string.Join(',', r.UncoveredWords), r.HazardWord, r.Guard, r.NegationCue, r.Conditioning is not null,
            r.RegistryHash, r.ModelId, r.Confirm, string.Join(',', r.Corrections));
        sb.Append(" | ").Append(Describe(r.Candidates));
        return sb.ToString();
    }

    private static string Describe(IReadOnlyList<TaskCandidate> candidates)
        => string.Join("; ", candidates.Select(c => $"{c.TaskId} \"{c.Phrase}\" {Bits(c.Score)}"));

    private static string Bits(float? value)
        => value is { } v ? $"{v.ToString("R", CultureInfo.InvariantCulture)}#{BitConverter.SingleToInt32Bits(v):x8}" : "-";
}
