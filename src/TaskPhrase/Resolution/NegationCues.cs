namespace TaskPhrase.Resolution;

/// <summary>
/// Finds negation cues in an utterance ("don't", "do not", "never", "no longer", …). A cue counts only when
/// the matched task's approved phrases do not carry the same cue themselves. Thread-safe.
/// </summary>
public static class NegationCues
{
    /// <summary>Single-word cues (after apostrophe folding and lower-casing).</summary>
    public static IReadOnlySet<string> Words { get; } = new HashSet<string>(StringComparer.Ordinal)
    {
        "don't", "dont", "doesn't", "doesnt", "didn't", "didnt", "never", "not", "won't", "wont",
        "shouldn't", "shouldnt", "mustn't", "mustnt", "stop", "quit", "cease", "cancel", "skip",
    };

    /// <summary>Two-word cues.</summary>
    public static IReadOnlySet<string> Pairs { get; } = new HashSet<string>(StringComparer.Ordinal)
    {
        "do not", "does not", "did not", "will not", "should not", "must not", "no longer", "no more", "not anymore",
        "leave alone", "hold off", "no need", "no thanks", "no thank", "not now",
    };

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
