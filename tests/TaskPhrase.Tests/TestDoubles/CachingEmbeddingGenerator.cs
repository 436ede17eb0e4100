using System.Collections.Concurrent;
using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;

namespace TaskPhrase.Tests.TestDoubles;

/// <summary>Wraps a real generator and memoises vectors by text, so slow-tier tests embed each text once per run.</summary>
public sealed class CachingEmbeddingGenerator(IEmbeddingGenerator<string, Embedding<float>> inner) : IEmbeddingGenerator<string, Embedding<float>>
{
    private readonly ConcurrentDictionary<string, Embedding<float>> _cache = new(StringComparer.Ordinal);

    public async Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
    {
        var list = values.ToList();
        var missing = list.Where(v => !_cache.ContainsKey(v)).Distinct().ToList();
        if (missing.Count > 0)
        {
            var fresh = await inner.GenerateAsync(missing, options, cancellationToken);
            for (int i = 0; i < missing.Count; i++) _cache[missing[i]] = fresh[i];
        }
        return new GeneratedEmbeddings<Embedding<float>>(list.Select(v => _cache[v]));
    }

    // Expose the model identity but not the span fast path, so every call goes through the cache.
    public object? GetService(Type serviceType, object? serviceKey = null)
        => serviceType == typeof(EmbeddingModelInfo) || serviceType == typeof(EmbeddingGeneratorMetadata) ? inner.GetService(serviceType, serviceKey) : null;

    public void Dispose() { }
}
