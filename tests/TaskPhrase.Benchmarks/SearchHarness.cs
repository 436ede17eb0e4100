using System.Numerics.Tensors;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>search</c>: phrase search over synthetic registries of random unit vectors (10 phrases per task, 384
/// dimensions; the query vector comes from a model-free generator), interleaved in random order each round so load
/// from other tenants lands on all alike: <see cref="TaskResolver.Rank"/> under each strategy against a textbook
/// brute-force scan (one dot product per phrase row, best row per task). Reports medians, p99 and managed bytes
/// allocated per call. <c>--sizes 1000,10000,100000 --rounds N</c>.
/// <c>--real</c> (or <c>--clinc150 FILE</c>) uses real embeddings instead (all-MiniLM-L6-v2 of CLINC150, Larson et al., 2019): phrases
/// are training queries, ten consecutive queries of one intent per task (1,000 phrases: the first ten of 100 intents;
/// more: each intent's queries in groups of ten, up to 15,000), and each round's query is the next of 300 validation
/// queries. The embeddings are computed once and kept in the scratch folder. <c>--diagnose</c> first times the 8-bit
/// phrase screen's bounds alone and counts the tasks it leaves to score exactly (for 5 candidates), and adds a best-phrase
/// ranking with the screen turned off. <c>--alone</c> also times each operation on its own, many calls in a row (warm
/// caches: what the operation costs when nothing else ran since its last call), after the interleaved table.
/// </summary>
internal static class SearchHarness
{
    private const int Dimensions = 384;
    private const int PhrasesPerTask = 10;

    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "sizes", "rounds", "real", "clinc150", "diagnose", "alone");
        bool real = a.Flag("real") || a.Flag("clinc150");
        var sizes = real ? a.Ints("sizes", 1_000, 10_000) : a.Ints("sizes", 1_000, 10_000, 100_000);
        var clinc = real ? RealEmbeddings.Load(a.Flag("clinc150") ? a.Text("clinc150", "") : "") : null;
        int requested = a.Int("rounds", 0);
        var strategies = new[] { ScoringStrategy.Centroid, ScoringStrategy.BestPhrase, ScoringStrategy.Blend, ScoringStrategy.TopK, ScoringStrategy.Whitened };
        Console.WriteLine($"search: {Dimensions} dimensions, {PhrasesPerTask} phrases per task, {Environment.ProcessorCount} logical CPUs, load average {LoadAverage()}");
        foreach (int phrases in sizes)
        {
            int rounds = requested > 0 ? requested : phrases >= 100_000 ? 60 : phrases >= 10_000 ? 300 : 2000;
            var random = new Random(20240611);
            var matrix = new float[phrases * Dimensions];
            var query = new float[Dimensions];
            if (clinc is null)
            {
                for (int r = 0; r < phrases; r++) HashedEmbeddingGenerator.Fill(random, matrix.AsSpan(r * Dimensions, Dimensions));
                HashedEmbeddingGenerator.Fill(random, query);
            }
            else clinc.Phrases(phrases, PhrasesPerTask).CopyTo(matrix);
            var sims = new float[phrases];
            var best = new float[phrases / PhrasesPerTask];
            var registry = SyntheticRegistry.Direct(phrases / PhrasesPerTask, PhrasesPerTask);
            var generator = new HashedEmbeddingGenerator(Dimensions) { Query = query };

            if (a.Flag("diagnose"))
            {
                // How much of a screened best-phrase rank is the screen itself, and how many tasks it leaves to score exactly.
                var screen = PhraseScreen.Build(matrix, Dimensions);
                int tasks = phrases / PhrasesPerTask;
                var phraseTask = Enumerable.Range(0, phrases).Select(r => r / PhrasesPerTask).ToArray();
                var lower = new double[tasks];
                var upper = new double[tasks];
                var screenSamples = new Samples("screen bounds only", rounds);
                long candidates = 0;
                // Past tiered compilation: 30 calls, then a recompile in the background after a 100 ms delay.
                for (var warm = System.Diagnostics.Stopwatch.StartNew(); warm.ElapsedMilliseconds < 600;) screen.Bounds(query, phraseTask, lower, upper);
                for (int i = 0; i < rounds; i++)
                {
                    clinc?.Query(i).CopyTo(query);
                    screenSamples.Time(() => screen.Bounds(query, phraseTask, lower, upper));
                    double fifth = lower.OrderDescending().ElementAt(Math.Min(4, tasks - 1));
                    candidates += upper.Count(u => u >= fifth);
                }
                Console.WriteLine($"{phrases:N0} phrases: {screenSamples.Row()} tasks scored exactly (count 5): {candidates / (double)rounds:0.0} of {tasks}");
            }
            var names = new List<string> { "brute force (baseline)" };
            var ops = new List<Action>
            {
                () =>
                {
                    for (int r = 0; r < sims.Length; r++) sims[r] = TensorPrimitives.Dot(query, matrix.AsSpan(r * Dimensions, Dimensions));
                    for (int t = 0; t < best.Length; t++) best[t] = TensorPrimitives.Max(sims.AsSpan(t * PhrasesPerTask, PhrasesPerTask));
                },
            };
            foreach (var strategy in strategies)
            {
                // Whitening fits a full covariance: skipped where fitting would dominate the run.
                if (strategy == ScoringStrategy.Whitened && phrases > 10_000) continue;
                var resolver = TaskResolver.FromEmbeddings(registry, generator, generator.Model, matrix, [],
                    new ResolverOptions { Scoring = strategy, UnintelligibleGuard = false });
                names.Add($"Rank, {strategy}");
                ops.Add(() => resolver.Rank("find the nearest task"));
                if (strategy == ScoringStrategy.BestPhrase && a.Flag("diagnose"))
                {
                    // The same ranking with the screen turned off: every phrase scored exactly.
                    var unscreened = TaskResolver.FromEmbeddings(registry, generator, generator.Model, matrix, [],
                        new ResolverOptions { Scoring = strategy, UnintelligibleGuard = false, PhraseScreen = false });
                    names.Add($"Rank, {strategy} (no screen)");
                    ops.Add(() => unscreened.Rank("find the nearest task"));
                }
            }
            var samples = names.Select(n => new Samples(n, rounds)).ToArray();
            var allocated = new long[ops.Count];
            // Past tiered compilation (30 calls, then the background recompile) before anything is recorded.
            for (int i = 0; i < Math.Min(200, Math.Max(40, rounds / 5)); i++) foreach (var op in ops) op();
            int[] order = Enumerable.Range(0, ops.Count).ToArray();
            for (int i = 0; i < rounds; i++)
            {
                clinc?.Query(i).CopyTo(query);
                random.Shuffle(order);
                foreach (int k in order)
                {
                    long before = GC.GetAllocatedBytesForCurrentThread();
                    samples[k].Time(ops[k]);
                    allocated[k] += GC.GetAllocatedBytesForCurrentThread() - before;
                }
            }
            Console.WriteLine();
            Console.WriteLine($"{phrases:N0} phrases ({phrases / PhrasesPerTask:N0} tasks), {rounds} rounds{(clinc is null ? ", random unit vectors" : ", CLINC150 embeddings")}");
            Console.WriteLine(Samples.Header + " allocated |");
            for (int k = 0; k < ops.Count; k++) Console.WriteLine($"{samples[k].Row()} {allocated[k] / rounds} B |");
            if (a.Flag("alone"))
            {
                // Each operation on its own: every call right after the previous one, so its data stays in cache.
                Console.WriteLine();
                Console.WriteLine($"{phrases:N0} phrases, each operation alone (warm caches), {rounds} calls");
                Console.WriteLine(Samples.Header);
                for (int k = 0; k < ops.Count; k++)
                {
                    var alone = new Samples(names[k], rounds);
                    for (int i = 0; i < rounds; i++)
                    {
                        clinc?.Query(i).CopyTo(query);
                        alone.Time(ops[k]);
                    }
                    Console.WriteLine(alone.Row());
                }
            }
        }
    }

    private static string LoadAverage()
        => File.Exists("/proc/loadavg") ? string.Join(' ', File.ReadAllText("/proc/loadavg").Split(' ').Take(3)) : "unknown";
}
