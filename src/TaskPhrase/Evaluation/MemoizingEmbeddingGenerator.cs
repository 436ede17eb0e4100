using System.Collections.Concurrent;
using Microsoft.Extensions.AI;

namespace TaskPhrase.Evaluation;

/// <summary>
/// Wraps a generator and remembers every vector by its exact text, so a search that resolves the same suite under many
/// scoring settings embeds each text once. Services (model identity, the tokenizer statistics of the span embedder) are
/// those of the inner generator. Thread-safe; does not own the inner generator.
/// </summary>
internal sealed class MemoizingEmbeddingGenerator(IEmbeddingGenerator<string, Embedding<float>> inner) : IEmbeddingGenerator<string, Embedding<float>>
{
    private readonly ConcurrentDictionary<string, Embedding<float>> _cache = new(StringComparer.Ordinal);

    /// <summary>How many texts the inner generator has embedded so far.</summary>
    public int Embedded => _cache.Count;

    public async Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
    {
        var list = values as IReadOnlyList<string> ?? values.ToList();
        var missing = list.Where(v => !_cache.ContainsKey(v)).Distinct(StringComparer.Ordinal).ToList();
        if (missing.Count > 0)
        {
            var fresh = await inner.GenerateAsync(missing, options, cancellationToken).ConfigureAwait(false);
            if (fresh.Count != missing.Count)
                throw new InvalidOperationException($"The embedding generator returned {fresh.Count} vectors for {missing.Count} texts.");
            for (int i = 0; i < missing.Count; i++) _cache[missing[i]] = fresh[i];
        }
        var result = new GeneratedEmbeddings<Embedding<float>>(list.Count);
        foreach (var v in list) result.Add(_cache[v]);
        return result;
    }

    public object? GetService(Type serviceType, object? serviceKey = null)
        => serviceKey is null && serviceType.IsInstanceOfType(this) ? this : inner.GetService(serviceType, serviceKey);

    public void Dispose()
    {
    }
}
