using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;

namespace TaskPhrase.Fuzz;

/// <summary>
/// A deterministic stand-in for a sentence embedder: the vector of a text is derived from its characters and
/// L2-normalised, so no model is needed. Reports <see cref="EmbeddingModelInfo"/> as given.
/// </summary>
internal sealed class FixedEmbeddingGenerator(EmbeddingModelInfo model) : IEmbeddingGenerator<string, Embedding<float>>
{
    public EmbeddingModelInfo Model { get; } = model;

    public Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
    {
        var result = new GeneratedEmbeddings<Embedding<float>>();
        foreach (var text in values) result.Add(new Embedding<float>(Vector(text, Model.Dimensions)));
        return Task.FromResult(result);
    }

    public static float[] Vector(string text, int dimensions)
    {
        var v = new float[dimensions];
        for (int i = 0; i < dimensions; i++) v[i] = 1f / (i + 1);
        for (int i = 0; i < text.Length; i++) v[(text[i] + i) % dimensions] += (text[i] % 7) + 1;
        float norm = MathF.Sqrt(v.Sum(x => x * x));
        for (int i = 0; i < dimensions; i++) v[i] /= norm;
        return v;
    }

    public object? GetService(Type serviceType, object? serviceKey = null)
        => serviceKey is null && serviceType == typeof(EmbeddingModelInfo) ? Model : null;

    public void Dispose()
    {
    }
}
