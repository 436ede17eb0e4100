using TaskPhrase.Embedding;

namespace TaskPhrase.Resolution;

/// <summary>
/// Step 4 of the decision procedure: refuses text that does not look like language the model knows, before
/// it is embedded (an embedding of keyboard mash still lands near some task). Judged on word-piece statistics:
/// words the vocabulary knows stay whole; mash and pseudo-words break into fragments or unknown pieces.
/// Thresholds were set on generated nonsense and checked not to fire on real queries (CLINC150 validation).
/// </summary>
public static class UnintelligibleGuard
{
    /// <summary>Returns why the text is unintelligible, or null when it looks like language.</summary>
    public static string? Check(string text, SubwordStatistics stats)
    {
        ArgumentNullException.ThrowIfNull(text);
        if (CheckLetters(text) is { } why) return why;
        if (RepeatedWord(text) is int repeats and >= 2)
            return $"one word repeated {repeats} times";
        if (stats.Pieces > 0 && stats.UnknownPieces * 2 >= stats.Pieces)
            return $"{stats.UnknownPieces} of {stats.Pieces} word pieces are unknown to the model";
        if (stats.AlphabeticWords == 0)
            return "no words the model knows";
        // Every alphabetic word breaks into fragments: mash, pseudo-words, or a single garbled word.
        if (stats.FragmentedWords == stats.AlphabeticWords && stats.WholeWords == 0)
            return $"all {stats.AlphabeticWords} word(s) break into fragments the model does not know as words";
        // Mostly fragments, with at most one short known word among three or more words.
        if (stats.AlphabeticWords >= 3 && stats.FragmentedWords * 3 >= stats.AlphabeticWords * 2 && stats.WholeWords <= 1)
            return $"{stats.FragmentedWords} of {stats.AlphabeticWords} words break into fragments";
        return null;
    }

    /// <summary>The number of words when the text is one word repeated (or a single word), else null; no per-word strings.</summary>
    private static int? RepeatedWord(string text)
    {
        using var words = new Text.WordSpans(text);
        if (words.Count == 0) return null;
        var first = words[0];
        for (int i = 1; i < words.Count; i++)
            if (!words[i].SequenceEqual(first)) return null;
        return words.Count;
    }

    /// <summary>A model-free check: too few letters for a command.</summary>
    public static string? CheckLetters(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        int letters = 0, visible = 0;
        foreach (char c in text)
        {
            if (char.IsWhiteSpace(c)) continue;
            visible++;
            if (char.IsLetter(c)) letters++;
        }
        if (letters == 0) return "no letters";
        if (visible >= 4 && letters * 2 < visible) return $"only {letters} of {visible} characters are letters";
        return null;
    }
}
