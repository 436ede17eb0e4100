using System.Numerics.Tensors;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Resolution.Scoring;
using TaskPhrase.Tests.TestDoubles;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// Ranking under every scoring strategy, on registries below and above the resolver's stack limit for per-task
/// buffers (256 tasks), against a brute-force oracle written here from the strategy definitions with LINQ
/// (differential testing, common practice): same candidates, same nearest phrases, same order, and scores equal
/// (to float rounding for top-k, whose oracle averages in double). The learned strategies' per-task scores come from
/// the fitted whitening and the resolver's head, which have their own tests.
/// </summary>
public class TaskResolverSearchTests
{
    private const int Dims = 32;

    [Theory]
    [InlineData(ScoringStrategy.BestPhrase, 150, 8)]
    [InlineData(ScoringStrategy.Centroid, 150, 8)]
    [InlineData(ScoringStrategy.Blend, 150, 8)]
    [InlineData(ScoringStrategy.TopK, 150, 8)]
    [InlineData(ScoringStrategy.Whitened, 40, 6)]
    [InlineData(ScoringStrategy.Head, 30, 5)]
    [InlineData(ScoringStrategy.BestPhrase, 700, 1)]
    [InlineData(ScoringStrategy.Centroid, 400, 2)]
    [InlineData(ScoringStrategy.TopK, 300, 4)]
    public void Rank_Registry_EqualsBruteForce(ScoringStrategy strategy, int taskCount, int perTask)
    {
        var random = new Random(taskCount * 31 + perTask);
        var vectors = new Dictionary<string, float[]>(StringComparer.Ordinal);
        var tasks = new List<TaskDefinition>();
        for (int t = 0; t < taskCount; t++)
        {
            // Uneven phrase counts, so top-k sees tasks with fewer phrases than k.
            int count = Math.Max(1, perTask - t % 3);
            var phrases = Enumerable.Range(0, count).Select(p => $"phrase {p} of task {t}").ToArray();
            foreach (var p in phrases) vectors[p] = Gaussian(random);
            tasks.Add(new TaskDefinition { Id = $"task-{t}", Title = $"task {t}", Controller = new ControllerBinding("m.v1", 1), Phrases = phrases });
        }
        var queries = Enumerable.Range(0, 25).Select(i => $"query {i}").ToArray();
        foreach (var q in queries) vectors[q] = Gaussian(random);
        // Queries equal to a phrase's own vector: the nearest phrase is certain and near-ties between tasks likelier.
        foreach (var q in queries.Take(5)) vectors[q] = vectors[tasks[int.Parse(q[6..]) * 7 % taskCount].Phrases[0]];
        var generator = new ScriptedEmbeddingGenerator(vectors);
        var registry = new TaskRegistry(tasks, RegistryDefaults.Standard, "search-test");
        var resolver = TaskResolver.Create(registry, generator, new ResolverOptions { Scoring = strategy, UnintelligibleGuard = false, Candidates = 7 });

        foreach (var q in queries)
        {
            var expected = Oracle(strategy, registry, generator, resolver, generator.VectorOf(q));
            var ranked = resolver.Rank(q, 7);
            Assert.Equal(expected.Select(c => (c.TaskId, c.Phrase)), ranked.Select(c => (c.TaskId, c.Phrase)));
            for (int k = 0; k < ranked.Count; k++)
            {
                if (strategy == ScoringStrategy.TopK) Assert.Equal(expected[k].Score, ranked[k].Score, 1e-5);
                else Assert.Equal(expected[k].Score, ranked[k].Score);
            }
            var resolved = resolver.Resolve(q);
            Assert.Equal(ranked, resolved.Candidates);
            Assert.Equal(ranked[0].TaskId, resolved.Task?.Id);
            Assert.Equal(ranked[0].Score, resolved.Score);
            Assert.Equal(ranked[0].Score - ranked[1].Score, resolved.Margin);
        }
    }

    /// <summary>The seven best tasks by the strategy's definition, with each task's nearest phrase.</summary>
    private static List<TaskCandidate> Oracle(ScoringStrategy strategy, TaskRegistry registry, ScriptedEmbeddingGenerator generator, TaskResolver resolver, float[] query)
    {
        var phraseTask = registry.Tasks.SelectMany((t, i) => t.Phrases.Select(_ => i)).ToArray();
        var all = registry.Tasks.SelectMany(t => t.Phrases).SelectMany(generator.VectorOf).ToArray();
        var learned = new float[registry.Tasks.Count];
        if (strategy == ScoringStrategy.Whitened) Whitening.Fit(all, phraseTask, registry.Tasks.Count, Dims, null).ScoreTasks(query, learned);
        if (strategy == ScoringStrategy.Head) resolver.Head!.ScoreTasks(query, learned, out _);
        var scored = new List<(int Index, TaskCandidate Candidate)>();
        for (int t = 0; t < registry.Tasks.Count; t++)
        {
            var task = registry.Tasks[t];
            var sims = task.Phrases.Select(p => TensorPrimitives.Dot(query, generator.VectorOf(p))).ToArray();
            int nearest = Array.IndexOf(sims, sims.Max());
            var centroid = new float[Dims];
            foreach (var p in task.Phrases) TensorPrimitives.Add(centroid, generator.VectorOf(p), centroid);
            TensorPrimitives.Divide(centroid, TensorPrimitives.Norm(centroid), centroid);
            float c = TensorPrimitives.Dot(query, centroid);
            float score = strategy switch
            {
                ScoringStrategy.BestPhrase => sims.Max(),
                ScoringStrategy.Centroid => c,
                ScoringStrategy.Blend => 0.5f * (c + sims.Max()),
                ScoringStrategy.TopK => (float)sims.OrderDescending().Take(3).Average(),
                ScoringStrategy.Whitened or ScoringStrategy.Head => learned[t],
                _ => throw new ArgumentOutOfRangeException(nameof(strategy)),
            };
            scored.Add((t, new TaskCandidate(task.Id, task.Phrases[nearest], score)));
        }
        return scored.OrderByDescending(s => s.Candidate.Score).ThenBy(s => s.Index).Take(7).Select(s => s.Candidate).ToList();
    }

    [Fact]
    public void SelectTop_TiesAndNaN_EqualsStableDescendingSort()
    {
        var random = new Random(5);
        float[] values = [0.5f, 0.25f, -1f, float.NaN, float.NegativeInfinity, 0f, -0f, 1f];
        for (int trial = 0; trial < 2000; trial++)
        {
            var scores = new float[random.Next(1, 40)];
            for (int i = 0; i < scores.Length; i++) scores[i] = values[random.Next(values.Length)];
            int count = random.Next(1, scores.Length + 1);
            var top = new int[count];
            TaskResolver.SelectTop(scores, top);
            var expected = Enumerable.Range(0, scores.Length).OrderByDescending(t => scores[t]).ThenBy(t => t).Take(count);
            Assert.Equal(expected, top);
        }
    }

    private static float[] Gaussian(Random random)
        => Enumerable.Range(0, Dims).Select(_ => (float)(Math.Sqrt(-2.0 * Math.Log(1.0 - random.NextDouble())) * Math.Cos(2 * Math.PI * random.NextDouble()))).ToArray();
}
