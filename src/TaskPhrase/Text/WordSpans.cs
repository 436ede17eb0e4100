using System.Buffers;

namespace TaskPhrase.Text;

/// <summary>
/// The words of a text exactly as <see cref="WordStemmer.Words"/> gives them, as spans over one lower-cased copy
/// held in pooled buffers instead of one string per word. Dispose it to return the buffers; a span is valid until then.
/// </summary>
internal ref struct WordSpans
{
    private char[]? _chars;
    private Range[]? _ranges;

    public WordSpans(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        _chars = ArrayPool<char>.Shared.Rent(Math.Max(1, text.Length));
        _ranges = ArrayPool<Range>.Shared.Rent(text.Length / 2 + 1);
        int count = 0, start = 0, length = 0;
        for (int i = 0; i < text.Length; i++)
        {
            char raw = text[i];
            char c = raw is '\u2019' or '\u2018' or '\u02BC' or '`' ? '\'' : char.ToLowerInvariant(raw);
            _chars[i] = c;
            if (char.IsLetterOrDigit(c) || c == '\'')
            {
                if (length++ == 0) start = i;
                continue;
            }
            Add(ref count, start, length);
            length = 0;
        }
        Add(ref count, start, length);
        Count = count;
    }

    /// <summary>Number of words.</summary>
    public int Count { get; }

    /// <summary>Word <paramref name="index"/>.</summary>
    public readonly ReadOnlySpan<char> this[int index]
        => (uint)index < (uint)Count ? _chars.AsSpan(_ranges![index]) : throw new ArgumentOutOfRangeException(nameof(index));

    /// <summary>Returns the buffers to the pool.</summary>
    public void Dispose()
    {
        if (_chars is not null) ArrayPool<char>.Shared.Return(_chars);
        if (_ranges is not null) ArrayPool<Range>.Shared.Return(_ranges);
        _chars = null;
        _ranges = null;
    }

    /// <summary>Keeps the run [start, start + length) as a word, with edge apostrophes trimmed, when anything is left.</summary>
    private readonly void Add(ref int count, int start, int length)
    {
        var word = _chars.AsSpan(start, length);
        int lead = word.Length - word.TrimStart('\'').Length;
        int kept = word.Trim('\'').Length;
        if (kept > 0) _ranges![count++] = new Range(start + lead, start + lead + kept);
    }
}
