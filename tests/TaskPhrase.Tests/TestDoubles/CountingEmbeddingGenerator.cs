using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;

namespace TaskPhrase.Tests.TestDoubles;

/// <summary>Passes calls to a real generator (without its span fast path) and counts the texts embedded.</summary>
public sealed class CountingEmbeddingGenerator(IEmbeddingGenerator<string, Embedding<float>> inner) : IEmbeddingGenerator<string, Embedding<float>>
{
    private int _texts;

    public int TextsEmbedded => Volatile.Read(ref _texts);

    public Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
    {
        var list = values.ToList();
        Interlocked.Add(ref _texts, list.Count);
        return inner.GenerateAsync(list, options, cancellationToken);
    }

    public object? GetService(Type serviceType, object? serviceKey = null)
        => serviceType == typeof(EmbeddingModelInfo) ? inner.GetService(serviceType, serviceKey) : null;

    public void Dispose() { }
}
