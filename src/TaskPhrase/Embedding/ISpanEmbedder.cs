namespace TaskPhrase.Embedding;

/// <summary>
/// An optional fast path an embedding generator can offer besides
/// <c>IEmbeddingGenerator&lt;string, Embedding&lt;float&gt;&gt;</c>: embed one text straight into a
/// caller-supplied buffer, without tasks or per-call allocation. The resolver uses it when the
/// generator returns it from <c>GetService(typeof(ISpanEmbedder))</c>.
/// </summary>
/// <remarks>Implementations must be thread-safe.</remarks>
public interface ISpanEmbedder
{
    /// <summary>Identity of the model; <see cref="EmbeddingModelInfo.Dimensions"/> is the length <c>destination</c> must have.</summary>
    EmbeddingModelInfo Model { get; }

    /// <summary>Embeds <paramref name="text"/> into <paramref name="destination"/> (L2-normalised).</summary>
    /// <returns>True when the input was longer than the model's limit and was truncated.</returns>
    bool Embed(string text, Span<float> destination);

    /// <summary>Word-piece statistics of <paramref name="text"/> under the model's tokenizer (for the unintelligible guard).</summary>
    SubwordStatistics Analyze(string text);
}
