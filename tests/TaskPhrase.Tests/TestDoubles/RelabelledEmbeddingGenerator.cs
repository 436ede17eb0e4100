using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;

namespace TaskPhrase.Tests.TestDoubles;

/// <summary>Passes calls to a real generator but claims to be another model (as if another model file were loaded).</summary>
public sealed class RelabelledEmbeddingGenerator(IEmbeddingGenerator<string, Embedding<float>> inner, EmbeddingModelInfo claimed) : IEmbeddingGenerator<string, Embedding<float>>
{
    public Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
        => inner.GenerateAsync(values, options, cancellationToken);

    public object? GetService(Type serviceType, object? serviceKey = null)
        => serviceType == typeof(EmbeddingModelInfo) && serviceKey is null ? claimed : null;

    public void Dispose() { }
}
