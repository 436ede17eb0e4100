namespace TaskPhrase.Embedding;

/// <summary>
/// Identity of a sentence-embedding model, as recorded in indexes, reports and resolutions.
/// Embedding generators expose it through <c>GetService(typeof(EmbeddingModelInfo))</c>.
/// </summary>
/// <param name="Id">Model id, e.g. <c>all-minilm-l6-v2</c>.</param>
/// <param name="Sha256">SHA-256 (lower-case hex) of the model file.</param>
/// <param name="Dimensions">Width of the embedding vectors.</param>
/// <param name="MaxTokens">Longest input in tokens (including special tokens); longer input is truncated and flagged.</param>
/// <param name="Pooling">Pooling method: <c>mean</c> or <c>cls</c>.</param>
public sealed record EmbeddingModelInfo(string Id, string Sha256, int Dimensions, int MaxTokens, string Pooling);
