using System.Numerics.Tensors;
using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// A model-free embedding generator for benchmarks that must not measure the model: each text gets a
/// pseudo-random unit vector seeded by a hash of the text (the same text always gets the same vector), and
/// <see cref="Query"/>, when set, is returned for every single-text call. Counts the texts it embedded, so a
/// benchmark can prove a path made no forward passes. Thread-safe.
/// </summary>
internal sealed class HashedEmbeddingGenerator : IEmbeddingGenerator<string, Embedding<float>>, ISpanEmbedder
{
    private long _texts;

    public HashedEmbeddingGenerator(int dimensions = 384)
        => Model = new EmbeddingModelInfo("hashed-benchmark-model", new string('b', 64), dimensions, 256, "mean");

    public EmbeddingModelInfo Model { get; }

    /// <summary>Returned by <see cref="Embed"/> instead of the hashed vector when set.</summary>
    public float[]? Query { get; set; }

    /// <summary>Texts embedded so far (batched and single).</summary>
    public long TextsEmbedded => Interlocked.Read(ref _texts);

    public static float[] VectorOf(string text, int dimensions)
    {
        var v = new float[dimensions];
        Fill(new Random(StableHash(text)), v);
        return v;
    }

    /// <summary>Fills <paramref name="destination"/> with a uniformly distributed random unit vector (normalised Gaussian draws).</summary>
    public static void Fill(Random random, Span<float> destination)
    {
        for (int i = 0; i < destination.Length; i++)
        {
            // Box–Muller: a direction uniform on the sphere needs Gaussian components (common practice).
            double u1 = 1.0 - random.NextDouble(), u2 = random.NextDouble();
            destination[i] = (float)(Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2));
        }
        TensorPrimitives.Divide(destination, TensorPrimitives.Norm(destination), destination);
    }

    public bool Embed(string text, Span<float> destination)
    {
        Interlocked.Increment(ref _texts);
        if (Query is { } q) q.CopyTo(destination);
        else Fill(new Random(StableHash(text)), destination);
        return false;
    }

    /// <summary>Statistics of plain language (every word whole), so the unintelligible guard lets the text through.</summary>
    public SubwordStatistics Analyze(string text)
    {
        int words = text.Split(' ', StringSplitOptions.RemoveEmptyEntries).Length;
        return new SubwordStatistics(words, words, words, 0, 0, words);
    }

    public Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
    {
        var result = new GeneratedEmbeddings<Embedding<float>>();
        foreach (var text in values)
        {
            Interlocked.Increment(ref _texts);
            result.Add(new Embedding<float>(VectorOf(text, Model.Dimensions)));
        }
        return Task.FromResult(result);
    }

    public object? GetService(Type serviceType, object? serviceKey = null)
    {
        if (serviceKey is not null) return null;
        if (serviceType == typeof(EmbeddingModelInfo)) return Model;
        return serviceType.IsInstanceOfType(this) ? this : null;
    }

    public void Dispose()
    {
    }

    /// <summary>FNV-1a over the UTF-16 code units: stable across runs and processes, unlike string.GetHashCode.</summary>
    private static int StableHash(string text)
    {
        uint h = 2166136261;
        foreach (char c in text) h = (h ^ c) * 16777619;
        return (int)h;
    }
}
