namespace TaskPhrase.Registry;

/// <summary>
/// Thrown when an index file cannot be used. The message is one line: what is wrong, which file, what to do
/// (for a model or registry mismatch it names both hashes).
/// </summary>
public sealed class IndexException : Exception
{
    /// <summary>Creates the exception.</summary>
    /// <param name="kind">Why the index was refused.</param>
    /// <param name="path">The index file.</param>
    /// <param name="message">The one-line message.</param>
    /// <param name="innerException">The underlying error, if any.</param>
    public IndexException(IndexErrorKind kind, string path, string message, Exception? innerException = null)
        : base(message, innerException)
    {
        Kind = kind;
        Path = path;
    }

    /// <summary>Why the index was refused.</summary>
    public IndexErrorKind Kind { get; }

    /// <summary>The index file, as given to <see cref="TaskIndex.Load(string, Embedding.EmbeddingModelInfo?)"/>.</summary>
    public string Path { get; }
}
