using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;

namespace TaskPhrase.Hosting.Tests.TestDoubles;

/// <summary>
/// Passes calls to a real generator; once <see cref="Delay"/> is set, every call first waits that long
/// (honouring cancellation), to make requests slow on purpose. No span fast path, so every utterance comes here.
/// </summary>
public sealed class SlowEmbeddingGenerator(IEmbeddingGenerator<string, Embedding<float>> inner) : IEmbeddingGenerator<string, Embedding<float>>
{
    private int _started;

    public TimeSpan Delay { get; set; }

    /// <summary>Calls that have started waiting since the delay was set.</summary>
    public int Started => Volatile.Read(ref _started);

    public async Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
    {
        var list = values.ToList();
        if (Delay > TimeSpan.Zero)
        {
            Interlocked.Increment(ref _started);
            await Task.Delay(Delay, cancellationToken);
        }
        return await inner.GenerateAsync(list, options, cancellationToken);
    }

    public object? GetService(Type serviceType, object? serviceKey = null)
        => serviceType == typeof(EmbeddingModelInfo) || serviceType == typeof(EmbeddingGeneratorMetadata) ? inner.GetService(serviceType, serviceKey) : null;

    public void Dispose() { }
}
