using System.Runtime.CompilerServices;
using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

/// <summary>
/// Proposes a rewrite of an utterance for speech-recognition slips that produce another real word ("pick up the
/// male", "water the basel"): a word the registry does not use is swapped for the one registry word that sounds
/// alike — the same American Soundex code, spelt within one edit (two for words of seven letters or more), at most two letters
/// longer or shorter. Stop words, negation cues and hazard words are never swapped, and neither is a word with two
/// equally close candidates. The rewrite is only a proposal: the resolver re-resolves it and keeps it only when it
/// is accepted clearly (see <see cref="ResolverOptions.SecondChance"/>).
/// </summary>
internal static class SoundsLikeCorrector
{
    /// <summary>Words shorter than this are neither swapped nor swapped in.</summary>
    public const int MinLength = 3;

    /// <summary>Words of at least this many letters may be two edits from their sound-alike; shorter ones one edit.</summary>
    public const int TwoEditLength = 7;

    private static readonly ConditionalWeakTable<IReadOnlyList<string>, Dictionary<string, string[]>> Codes = new();

    /// <summary>The rewrite and its swaps (from, to), or null when no word has a sound-alike in the registry.</summary>
    public static (string Text, IReadOnlyList<(string From, string To)> Swaps)? Propose(string text, IReadOnlySet<string> vocabulary,
        IReadOnlyList<string> vocabularyList, HazardLexicon hazards)
    {
        var byCode = Codes.GetValue(vocabularyList, Group);
        Span<char> code = stackalloc char[4];
        List<(string Word, string Replacement)>? replacements = null;
        List<(string, string)>? swaps = null;
        foreach (var w in WordStemmer.Words(text))
        {
            if (w.Length < MinLength || vocabulary.Contains(w) || StopWords.Contains(w) || NegationCues.Words.Contains(w)
                || (replacements?.Exists(r => r.Word == w) ?? false) || !IsAsciiWord(w) || hazards.FindIn([w]) is not null)
                continue;
            if (!Soundex.TryEncode(w, code) || !byCode.TryGetValue(new string(code), out var candidates)) continue;
            int limit = w.Length >= TwoEditLength ? 2 : 1;
            string? best = null;
            int bestDistance = int.MaxValue;
            bool tie = false;
            foreach (var v in candidates)
            {
                if (Math.Abs(v.Length - w.Length) > 2) continue;
                int d = EditDistance.Between(w, v);
                if (d > limit || d > bestDistance) continue;
                if (d == bestDistance) { tie = true; continue; }
                best = v;
                bestDistance = d;
                tie = false;
            }
            if (best is null || tie) continue;
            (replacements ??= []).Add((w, best));
            (swaps ??= []).Add((w, best));
        }
        if (replacements is null) return null;
        return (VocabularyCorrector.Replace(text, replacements), swaps!);
    }

    private static Dictionary<string, string[]> Group(IReadOnlyList<string> words)
    {
        var groups = new Dictionary<string, List<string>>(StringComparer.Ordinal);
        foreach (var v in words)
        {
            if (v.Length < MinLength || !IsAsciiWord(v) || StopWords.Contains(v)) continue;
            string? c = Soundex.Encode(v);
            if (c is null) continue;
            if (!groups.TryGetValue(c, out var list)) groups[c] = list = [];
            if (!list.Contains(v)) list.Add(v);
        }
        return groups.ToDictionary(g => g.Key, g => g.Value.Order(StringComparer.Ordinal).ToArray(), StringComparer.Ordinal);
    }

    private static bool IsAsciiWord(string w)
    {
        foreach (char c in w)
            if (!char.IsAsciiLetterLower(c)) return false;
        return true;
    }
}
