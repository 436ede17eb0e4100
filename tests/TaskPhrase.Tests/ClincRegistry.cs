using Microsoft.Extensions.AI;
using TaskPhrase.Registry;

namespace TaskPhrase.Tests;

/// <summary>Builds a registry from the first k training queries of each CLINC150 intent (Larson et al., 2019).</summary>
public static class ClincRegistry
{
    public static TaskRegistry Build(int perIntent, RegistryDefaults? defaults = null)
    {
        var seen = new HashSet<string>(StringComparer.Ordinal);
        var tasks = Clinc150.Split("train")
            .GroupBy(r => r.Intent)
            .Select(g => new TaskDefinition
            {
                Id = g.Key.Replace('_', '-'),
                Title = g.Key.Replace('_', ' '),
                Controller = new ControllerBinding("none", 1),
                Phrases = g.Select(r => r.Text).Where(t => seen.Add(TaskPhrase.Text.TextNormalizer.MatchKey(t))).Take(perIntent).ToArray(),
            })
            .ToArray();
        return new TaskRegistry(tasks, defaults ?? RegistryDefaults.Standard, $"clinc150-k{perIntent}");
    }

    public static string TaskIdOf(string intent) => intent == "oos" ? TaskPhrase.Evaluation.ProbeCase.Reject : intent.Replace('_', '-');

    /// <summary>
    /// The registry with <paramref name="queries"/> (out-of-scope training queries, never validation rows) added as
    /// <c>must_reject</c> look-alikes: each query goes to the <paramref name="nearest"/> tasks whose centroid (normalised
    /// mean of the approved phrase embeddings) has the highest cosine to it. A query whose match key equals an approved
    /// phrase of a task is not given to that task. Deterministic (ties: registry order).
    /// </summary>
    public static TaskRegistry WithLookAlikes(TaskRegistry registry, IReadOnlyList<string> queries,
        IEmbeddingGenerator<string, Embedding<float>> generator, int nearest)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(nearest, 1);
        var tasks = registry.Tasks;
        var phraseVectors = generator.GenerateAsync(tasks.SelectMany(t => t.Phrases).ToList()).GetAwaiter().GetResult();
        var queryVectors = generator.GenerateAsync(queries.ToList()).GetAwaiter().GetResult();
        int d = phraseVectors[0].Vector.Length, row = 0;
        var centroids = new float[tasks.Count][];
        for (int t = 0; t < tasks.Count; t++)
        {
            var c = new float[d];
            foreach (var _ in tasks[t].Phrases)
            {
                var v = phraseVectors[row++].Vector.Span;
                for (int a = 0; a < d; a++) c[a] += v[a];
            }
            float norm = MathF.Sqrt(c.Sum(x => x * x));
            for (int a = 0; a < d; a++) c[a] /= norm;
            centroids[t] = c;
        }
        var added = tasks.Select(_ => new List<string>()).ToArray();
        var keys = tasks.Select(t => t.Phrases.Select(TaskPhrase.Text.TextNormalizer.MatchKey).ToHashSet(StringComparer.Ordinal)).ToArray();
        for (int q = 0; q < queries.Count; q++)
        {
            var v = queryVectors[q].Vector.Span;
            var sims = new (float Sim, int Task)[tasks.Count];
            for (int t = 0; t < tasks.Count; t++)
            {
                float s = 0;
                for (int a = 0; a < d; a++) s += v[a] * centroids[t][a];
                sims[t] = (s, t);
            }
            string key = TaskPhrase.Text.TextNormalizer.MatchKey(queries[q]);
            foreach (var (_, t) in sims.OrderByDescending(x => x.Sim).ThenBy(x => x.Task).Take(nearest))
                if (!keys[t].Contains(key) && !added[t].Contains(queries[q], StringComparer.Ordinal)) added[t].Add(queries[q]);
        }
        var result = tasks.Select((t, i) => t with { MustReject = t.MustReject.Concat(added[i]).ToArray() }).ToArray();
        return new TaskRegistry(result, registry.Defaults, $"{registry.ContentHash}-lookalikes{queries.Count}x{nearest}",
            registry.ModelId, registry.SourcePath, registry.Settings);
    }
}
