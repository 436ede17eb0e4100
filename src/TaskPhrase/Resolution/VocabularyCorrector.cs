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
        var words = WordStemmer.Words(text);
        List<string>? corrections = null;
        var replacements = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var w in words)
        {
            if (w.Length < MinLength || vocabulary.Contains(w) || replacements.ContainsKey(w) || !w.All(char.IsLetter)) continue;
            var stats = tokenizer.Analyze(w);
            if (stats.FragmentedWords == 0 && stats.UnknownPieces == 0) continue;
            int limit = w.Length >= 8 ? 2 : 1;
            string? best = null;
            int bestDistance = int.MaxValue;
            bool tie = false;
            foreach (var v in vocabularyList)
            {
                if (Math.Abs(v.Length - w.Length) > limit || v.Length < MinLength) continue;
                int d = EditDistance.Between(w, v);
                if (d > limit || d > bestDistance) continue;
                if (d == bestDistance) { tie = true; continue; }
                best = v;
                bestDistance = d;
                tie = false;
            }
            if (best is null || tie) continue;
            replacements[w] = best;
            (corrections ??= []).Add($"{w} → {best}");
        }
        if (corrections is null) return (text, []);
        return (Replace(text, replacements), corrections);
    }

    internal static string Replace(string text, Dictionary<string, string> replacements)
    {
        var sb = new StringBuilder(text.Length + 8);
        int i = 0;
        while (i < text.Length)
        {
            if (!char.IsLetter(text[i])) { sb.Append(text[i++]); continue; }
            int start = i;
            while (i < text.Length && (char.IsLetterOrDigit(text[i]) || text[i] == '\'')) i++;
            string word = text[start..i];
            sb.Append(replacements.TryGetValue(word.ToLowerInvariant(), out var r) ? r : word);
        }
        return sb.ToString();
    }
}
