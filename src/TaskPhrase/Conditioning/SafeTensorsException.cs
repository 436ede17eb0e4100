namespace TaskPhrase.Conditioning;

/// <summary>
/// Thrown when a safetensors file (or a FiLM generator stored in one) is malformed or does not have the
/// expected content. The message says what was wrong, in which file and which tensor, and what to do;
/// <see cref="SourceName"/> and <see cref="TensorName"/> carry the same facts for programs. It is an
/// <see cref="IOException"/>, so callers that handle unreadable input in one place catch it there too.
/// </summary>
public sealed class SafeTensorsException : IOException
{
    /// <summary>Creates an exception with a message only.</summary>
    /// <param name="message">The complete message.</param>
    public SafeTensorsException(string message)
        : base(message)
    {
    }

    /// <summary>Creates an exception with a message and the exception that caused it.</summary>
    /// <param name="message">The complete message.</param>
    /// <param name="innerException">The cause.</param>
    public SafeTensorsException(string message, Exception innerException)
        : base(message, innerException)
    {
    }

    /// <summary>Creates an exception whose message is prefixed with the file and, when given, the tensor.</summary>
    /// <param name="sourceName">The file path or the name given to a stream or buffer.</param>
    /// <param name="tensorName">The tensor concerned, or null when the problem is not about one tensor.</param>
    /// <param name="message">What was wrong and what to do.</param>
    /// <param name="innerException">The cause, if any.</param>
    public SafeTensorsException(string sourceName, string? tensorName, string message, Exception? innerException = null)
        : base(Compose(sourceName, tensorName, message), innerException)
    {
        SourceName = sourceName;
        TensorName = tensorName;
    }

    /// <summary>The file path or the name given to a stream or buffer; null when not known.</summary>
    public string? SourceName { get; }

    /// <summary>The tensor concerned; null when the problem is not about one tensor.</summary>
    public string? TensorName { get; }

    private static string Compose(string sourceName, string? tensorName, string message)
    {
        ArgumentNullException.ThrowIfNull(sourceName);
        ArgumentNullException.ThrowIfNull(message);
        return tensorName is null ? $"{sourceName}: {message}" : $"{sourceName}: tensor '{tensorName}': {message}";
    }
}
