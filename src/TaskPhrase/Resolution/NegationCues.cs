namespace TaskPhrase.Resolution;

/// <summary>
/// Finds negation cues in an utterance ("don't", "do not", "never", "no longer", …). A cue counts only when
/// the matched task's approved phrases do not carry the same cue themselves. Thread-safe.
/// </summary>
public static class NegationCues
{
    private static readonly HashSet<string> WordSet = new(StringComparer.Ordinal)
    {
        "don't", "dont", "doesn't", "doesnt", "didn't", "didnt", "never", "not", "won't", "wont",
        "shouldn't", "shouldnt", "mustn't", "mustnt", "stop", "quit", "cease", "cancel", "skip",
    };

    private static readonly HashSet<string> PairSet = new(StringComparer.Ordinal)
    {
        "do not", "does not", "did not", "will not", "should not", "must not", "no longer", "no more", "not anymore",
        "leave alone", "hold off", "no need", "no thanks", "no thank", "not now",
    };

    private static readonly HashSet<string>.AlternateLookup<ReadOnlySpan<char>> WordLookup = WordSet.GetAlternateLookup<ReadOnlySpan<char>>();
    private static readonly HashSet<string>.AlternateLookup<ReadOnlySpan<char>> PairLookup = PairSet.GetAlternateLookup<ReadOnlySpan<char>>();

    /// <summary>Single-word cues (after apostrophe folding and lower-casing).</summary>
    public static IReadOnlySet<string> Words => WordSet;

    /// <summary>Two-word cues.</summary>
    public static IReadOnlySet<string> Pairs => PairSet;

    /// <summary>Whether <paramref name="word"/> is one of <see cref="Words"/>.</summary>
    internal static bool IsWord(ReadOnlySpan<char> word) => WordLookup.Contains(word);

    /// <summary><see cref="Find(IReadOnlyList{string})"/> over word spans: the same cue, without building strings.</summary>
    internal static string? Find(in Text.WordSpans words)
    {
        if (words.Count > 1 && words[0].SequenceEqual("no")) return "no";
        Span<char> pair = stackalloc char[64];
        for (int i = 0; i < words.Count; i++)
        {
            if (i + 1 < words.Count)
            {
                var first = words[i];
                var second = words[i + 1];
                // Every cue pair is shorter than the buffer; a longer pair cannot be one.
                if (first.Length + 1 + second.Length <= pair.Length)
                {
                    first.CopyTo(pair);
                    pair[first.Length] = ' ';
                    second.CopyTo(pair[(first.Length + 1)..]);
                    if (PairLookup.TryGetValue(pair[..(first.Length + 1 + second.Length)], out var cue)) return cue;
                }
            }
            if (WordLookup.TryGetValue(words[i], out var word)) return word;
        }
        return null;
    }

    /// <summary>Returns the first negation cue in the word sequence, or null. A leading "no" ("no blanket thanks") counts.</summary>
    /// <param name="words">Words as given by <see cref="Text.WordStemmer.Words"/>.</param>
    public static string? Find(IReadOnlyList<string> words)
    {
        ArgumentNullException.ThrowIfNull(words);
        if (words.Count > 1 && words[0] == "no") return "no";
        for (int i = 0; i < words.Count; i++)
        {
            if (i + 1 < words.Count)
            {
                string pair = words[i] + " " + words[i + 1];
                if (Pairs.Contains(pair)) return pair;
            }
            if (Words.Contains(words[i])) return words[i];
        }
        return null;
    }

    /// <summary>All cues present in the word sequence.</summary>
    public static IReadOnlySet<string> All(IReadOnlyList<string> words)
    {
        ArgumentNullException.ThrowIfNull(words);
        var found = new HashSet<string>(StringComparer.Ordinal);
        for (int i = 0; i < words.Count; i++)
        {
            if (i + 1 < words.Count && Pairs.Contains(words[i] + " " + words[i + 1])) found.Add(words[i] + " " + words[i + 1]);
            if (Words.Contains(words[i])) found.Add(words[i]);
        }
        return found;
    }
}
