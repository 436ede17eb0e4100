using System.Text;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

/// <summary>
/// Corrects typing slips toward the registry's own vocabulary before embedding: a word the model's tokenizer does
/// not know whole ("bazil" breaks into fragments) and that is one edit (two for words of eight letters or more)
/// from exactly one registry word is replaced by it. Real words are never changed ("hall night" stays), so a slip
/// that produces another real word is left to the embedding. Every correction is reported in the resolution.
/// </summary>
internal static class VocabularyCorrector
{
    /// <summary>Words shorter than this are never corrected (too many neighbours).</summary>
    public const int MinLength = 4;

    public static (string Text, IReadOnlyList<string> Corrections) Correct(string text, IReadOnlySet<string> vocabulary,
        IReadOnlyList<string> vocabularyList, ISpanEmbedder tokenizer)
    {
        // Words are spans; a string is made only for a word that is a candidate for correction (long enough, letters
        // only, not a registry word), and the replacement table only when a word is corrected.
        using var words = new WordSpans(text);
        HashSet<string>.AlternateLookup<ReadOnlySpan<char>> known = default;
        bool spanLookup = vocabulary is HashSet<string> set && set.TryGetAlternateLookup(out known);
        List<string>? corrections = null;
        List<(string Word, string Replacement)>? replacements = null;
        for (int i = 0; i < words.Count; i++)
        {
            var span = words[i];
            if (span.Length < MinLength) continue;
            if (spanLookup ? known.Contains(span) : vocabulary.Contains(span.ToString())) continue;
            if (replacements is not null && Find(replacements, span) is not null) continue;
            if (!AllLetters(span)) continue;
            string w = span.ToString();
            var stats = tokenizer.Analyze(w);
            if (stats.FragmentedWords == 0 && stats.UnknownPieces == 0) continue;
            int limit = w.Length >= 8 ? 2 : 1;
            string? best = null;
            int bestDistance = int.MaxValue;
            bool tie = false;
            foreach (var v in vocabularyList)
            {
                if (Math.Abs(v.Length - w.Length) > limit || v.Length < MinLength) continue;
                int d = EditDistance.BetweenWords(w, v);
                if (d > limit || d > bestDistance) continue;
                if (d == bestDistance) { tie = true; continue; }
                best = v;
                bestDistance = d;
                tie = false;
            }
            if (best is null || tie) continue;
            (replacements ??= []).Add((w, best));
            (corrections ??= []).Add($"{w} → {best}");
        }
        if (corrections is null) return (text, []);
        return (Replace(text, replacements!), corrections);

        static bool AllLetters(ReadOnlySpan<char> word)
        {
            foreach (char c in word)
                if (!char.IsLetter(c)) return false;
            return true;
        }
    }

    /// <summary>The replacement of <paramref name="word"/> (lower case), or null.</summary>
    private static string? Find(List<(string Word, string Replacement)> replacements, ReadOnlySpan<char> word)
    {
        foreach (var (w, r) in replacements)
            if (word.SequenceEqual(w)) return r;
        return null;
    }

    /// <summary>
    /// The text with every word (a letter, then letters, digits and apostrophes) whose lower case has a replacement
    /// replaced by it; everything else kept as it was.
    /// </summary>
    internal static string Replace(string text, List<(string Word, string Replacement)> replacements)
    {
        var sb = new StringBuilder(text.Length + 8);
        Span<char> lower = text.Length <= 256 ? stackalloc char[text.Length] : new char[text.Length];
        int i = 0;
        while (i < text.Length)
        {
            if (!char.IsLetter(text[i])) { sb.Append(text[i++]); continue; }
            int start = i;
            while (i < text.Length && (char.IsLetterOrDigit(text[i]) || text[i] == '\'')) i++;
            var word = text.AsSpan(start, i - start);
            // Words hold no surrogates (letters, digits and apostrophes only), so lower-casing char by char is the
            // string's invariant lower case.
            var key = lower[..word.Length];
            word.ToLowerInvariant(key);
            if (Find(replacements, key) is { } r) sb.Append(r);
            else sb.Append(word);
        }
        return sb.ToString();
    }
}
