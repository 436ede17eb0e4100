namespace TaskPhrase.Evaluation;

/// <summary>A pass-through reader (it never disposes the inner reader) that stops with <see cref="LimitExceededException"/> once more than a set number of characters were read.</summary>
internal sealed class LimitedTextReader(TextReader inner, long maxChars) : TextReader
{
    private long _read;

    /// <summary>Thrown when the input is longer than allowed.</summary>
    internal sealed class LimitExceededException : Exception;

    public override int Peek() => inner.Peek();

    public override int Read()
    {
        int c = inner.Read();
        if (c >= 0) Count(1);
        return c;
    }

    public override int Read(char[] buffer, int index, int count) => Count(inner.Read(buffer, index, count));

    public override int Read(Span<char> buffer) => Count(inner.Read(buffer));

    private int Count(int n)
    {
        _read += n;
        if (_read > maxChars) throw new LimitExceededException();
        return n;
    }
}
