using TaskPhrase.Tests.TestDoubles;

namespace TaskPhrase.Tests;

/// <summary>
/// One memoising generator over the shared model for the whole test run, so the CLINC150 queries (Larson et al., 2019)
/// are embedded once however many tests resolve them.
/// </summary>
public static class ClincEmbeddings
{
    private static readonly Lock Gate = new();
    private static CachingEmbeddingGenerator? _generator;

    public static CachingEmbeddingGenerator Generator(ModelFixture fixture)
    {
        lock (Gate) return _generator ??= new CachingEmbeddingGenerator(fixture.Embedder);
    }

    /// <summary>Validation rows (in-scope, then out-of-scope) with their half: 0 (A) or 1 (B), alternating per intent.</summary>
    public static IReadOnlyList<(string Text, string Expect, int Half)> ValidationHalves()
    {
        var rows = new List<(string, string, int)>();
        var seen = new Dictionary<string, int>(StringComparer.Ordinal);
        foreach (var (text, intent) in Clinc150.Split("val").Concat(Clinc150.Split("oos_val")))
        {
            int n = seen.GetValueOrDefault(intent);
            seen[intent] = n + 1;
            rows.Add((text, ClincRegistry.TaskIdOf(intent), n % 2));
        }
        return rows;
    }
}
