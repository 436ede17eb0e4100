using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;

namespace TaskPhrase.Cli;

/// <summary>
/// An embedder whose model is still loading on another thread. A resolver set up from an index needs no forward pass,
/// only the model's identity (the index's own, checked against the real model before the first resolve by
/// <see cref="ResolverFactory.CreateWithModel"/>), so reading the index and setting up the resolver overlap with ONNX
/// Runtime's session creation, the longest step of a cold start. Every call waits for the model, then forwards.
/// </summary>
internal sealed class DeferredEmbedder(EmbeddingModelInfo model, Task<ModelLease> loading) : IEmbeddingGenerator<string, Embedding<float>>, ISpanEmbedder
{
    private ISpanEmbedder Span => loading.GetAwaiter().GetResult().Embedder;

    private IEmbeddingGenerator<string, Embedding<float>> Generator => loading.GetAwaiter().GetResult().Embedder;

    /// <inheritdoc />
    public EmbeddingModelInfo Model => model;

    /// <inheritdoc />
    public bool Embed(string text, Span<float> destination) => Span.Embed(text, destination);

    /// <inheritdoc />
    public SubwordStatistics Analyze(string text) => Span.Analyze(text);

    /// <inheritdoc />
    public Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
        => Generator.GenerateAsync(values, options, cancellationToken);

    /// <inheritdoc />
    /// <remarks>Answers <see cref="EmbeddingModelInfo"/> with the promised identity without waiting (the resolver asks for it while it is set up).</remarks>
    public object? GetService(Type serviceType, object? serviceKey = null)
        => serviceKey is not null ? Generator.GetService(serviceType, serviceKey)
            : serviceType == typeof(EmbeddingModelInfo) ? model
            : serviceType.IsInstanceOfType(this) ? this
            : Generator.GetService(serviceType, serviceKey);

    /// <summary>Nothing to release: the <see cref="ModelLease"/> owns the real embedder.</summary>
    public void Dispose() { }
}
