using Lucene.Net.Tartarus.Snowball.Ext;

namespace TaskPhrase.Text;

/// <summary>
/// Splits text into lower-case words and reduces them to stems with the Snowball English (Porter 2)
/// stemmer from Lucene.Net.Analysis.Common. Thread-safe.
/// </summary>
public static class WordStemmer
{
    [ThreadStatic] private static EnglishStemmer? _stemmer;
    [ThreadStatic] private static char[]? _stemBuffer;

    /// <summary>The Snowball English stem of one lower-case word.</summary>
    /// <exception cref="ArgumentNullException"><paramref name="word"/> is null.</exception>
    public static string Stem(string word)
    {
        ArgumentNullException.ThrowIfNull(word);
        var stemmer = _stemmer ??= new EnglishStemmer();
        stemmer.SetCurrent(word);
        stemmer.Stem();
        return stemmer.Current;
    }

    /// <summary>
    /// <see cref="Stem"/> without allocating: the stem is left in this thread's stemmer, and the span is valid until the
    /// next stemming call on the same thread.
    /// </summary>
    internal static ReadOnlySpan<char> StemSpan(ReadOnlySpan<char> word)
    {
        var stemmer = _stemmer ??= new EnglishStemmer();
        var buffer = _stemBuffer is { } b && b.Length >= word.Length ? b : _stemBuffer = new char[Math.Max(32, word.Length * 2)];
        word.CopyTo(buffer);
        stemmer.SetCurrent(buffer, word.Length);
        stemmer.Stem();
        return stemmer.CurrentBuffer.AsSpan(0, stemmer.CurrentBufferLength);
    }

    /// <summary>
    /// The words of <paramref name="text"/>: maximal runs of letters, digits and apostrophes, lower-cased,
    /// with typographic apostrophes folded to <c>'</c> and edge apostrophes trimmed.
    /// </summary>
    /// <exception cref="ArgumentNullException"><paramref name="text"/> is null.</exception>
    public static IReadOnlyList<string> Words(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var words = new List<string>();
        var current = new System.Text.StringBuilder();
        foreach (char raw in text)
        {
            char c = raw is '\u2019' or '\u2018' or '\u02BC' or '`' ? '\'' : char.ToLowerInvariant(raw);
            if (char.IsLetterOrDigit(c) || c == '\'') { current.Append(c); continue; }
            Flush();
        }
        Flush();
        return words;

        void Flush()
        {
            if (current.Length == 0) return;
            string w = current.ToString().Trim('\'');
            if (w.Length > 0) words.Add(w);
            current.Clear();
        }
    }
}
