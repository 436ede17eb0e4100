using System.Globalization;
using System.Text;

namespace TaskPhrase.Text;

/// <summary>
/// Normalises user text the same way everywhere in TaskPhrase (step 1 of the decision procedure):
/// Unicode NFKC, control and format characters removed, white space collapsed and trimmed.
/// </summary>
/// <remarks>Pure and thread-safe. <see cref="Normalize"/> is idempotent.</remarks>
public static class TextNormalizer
{
    /// <summary>Returns the normalised form of <paramref name="text"/>.</summary>
    /// <param name="text">Any text; lone surrogates and the noncharacter U+FFFE (which the platform's NFKC refuses) are
    /// replaced by U+FFFD and then dropped, so no input makes this throw.</param>
    /// <exception cref="ArgumentNullException"><paramref name="text"/> is null.</exception>
    public static string Normalize(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        if (text.Length == 0 || IsPlainAscii(text)) return text;
        return NormalizeUnicode(text);
    }

    /// <summary><see cref="Normalize"/> without the plain-ASCII shortcut (the full Unicode route; tests compare the two).</summary>
    internal static string NormalizeUnicode(string text)
    {
        string result = NormalizeOnce(text);
        // Filtering can expose a new NFKC composition (a combining mark after a removed format char);
        // repeating until stable keeps the function idempotent. Converges in one or two rounds.
        for (int i = 0; i < 4; i++)
        {
            string again = NormalizeOnce(result);
            if (again == result) break;
            result = again;
        }
        return result;
    }

    /// <summary>
    /// True when <paramref name="text"/> is already its own normal form for a reason that is cheap to check: only
    /// printable ASCII (U+0021–U+007E, unchanged by NFKC and none of them control or format characters) and single
    /// spaces between them. Typed and transcribed commands nearly always are; they skip the Unicode work and keep
    /// their string instance.
    /// </summary>
    internal static bool IsPlainAscii(ReadOnlySpan<char> text)
    {
        if (text.IsEmpty || text[0] == ' ' || text[^1] == ' ') return false;
        char previous = 'x';
        foreach (char c in text)
        {
            if (c == ' ' ? previous == ' ' : c is < '\u0021' or > '\u007E') return false;
            previous = c;
        }
        return true;
    }

    /// <summary>
    /// <see cref="MatchKey"/> of a plain-ASCII text (see <see cref="IsPlainAscii"/>) written into
    /// <paramref name="destination"/> without allocating: such a text is its own normal form, and so is its invariant
    /// lower case, so the key is the lower-cased text with edge punctuation, symbols and spaces removed.
    /// </summary>
    /// <returns>The key's length, or -1 when the text is not plain ASCII or does not fit.</returns>
    internal static int PlainMatchKey(ReadOnlySpan<char> text, Span<char> destination)
    {
        if (text.Length > destination.Length || !IsPlainAscii(text)) return -1;
        int start = 0, end = text.Length;
        while (start < end && IsEdge(text[start])) start++;
        while (end > start && IsEdge(text[end - 1])) end--;
        for (int i = start; i < end; i++) destination[i - start] = char.ToLowerInvariant(text[i]);
        return end - start;
    }

    private static bool IsEdge(char c) => char.IsPunctuation(c) || char.IsSymbol(c) || c == ' ';

    private static string NormalizeOnce(string text)
    {
        string safe = ReplaceUnnormalizable(text);
        string nfkc = safe.IsNormalized(NormalizationForm.FormKC) ? safe : safe.Normalize(NormalizationForm.FormKC);
        var sb = new StringBuilder(nfkc.Length);
        Span<char> units = stackalloc char[2];
        bool pendingSpace = false;
        foreach (var rune in nfkc.EnumerateRunes())
        {
            var category = Rune.GetUnicodeCategory(rune);
            if (Rune.IsWhiteSpace(rune) || category is UnicodeCategory.LineSeparator or UnicodeCategory.ParagraphSeparator or UnicodeCategory.SpaceSeparator)
            {
                pendingSpace = sb.Length > 0;
                continue;
            }
            if (category is UnicodeCategory.Control or UnicodeCategory.Format or UnicodeCategory.PrivateUse
                or UnicodeCategory.OtherNotAssigned or UnicodeCategory.Surrogate
                || rune.Value == 0xFFFD)
            {
                continue;
            }
            if (pendingSpace) { sb.Append(' '); pendingSpace = false; }
            sb.Append(units[..rune.EncodeToUtf16(units)]);
        }
        return sb.ToString();
    }

    /// <summary>
    /// The key used for exact matching of an utterance against approved phrases: the normalised text,
    /// lower-cased (invariant culture) and normalised again (lower-casing can expose an NFKC composition, e.g.
    /// fullwidth H + U+0331 becomes h + U+0331, which composes to U+1E96), with leading and trailing punctuation and
    /// symbols removed. Idempotent: the key of a key is the key itself.
    /// </summary>
    /// <exception cref="ArgumentNullException"><paramref name="text"/> is null.</exception>
    public static string MatchKey(string text)
    {
        string n = Normalize(Normalize(text).ToLowerInvariant());
        int start = 0, end = n.Length;
        while (start < end && IsEdge(n[start])) start++;
        while (end > start && IsEdge(n[end - 1])) end--;
        return n[start..end];
    }

    /// <summary>
    /// Replaces what <see cref="string.Normalize(NormalizationForm)"/> throws on — lone surrogates and U+FFFE (.NET's ICU
    /// normalisation refuses both with an <see cref="ArgumentException"/>) — by U+FFFD.
    /// </summary>
    private static string ReplaceUnnormalizable(string text)
    {
        int i = 0;
        for (; i < text.Length; i++)
        {
            char c = text[i];
            if (char.IsHighSurrogate(c) && i + 1 < text.Length && char.IsLowSurrogate(text[i + 1])) { i++; continue; }
            if (char.IsSurrogate(c) || c == '\uFFFE') break;
        }
        if (i >= text.Length) return text;
        var chars = text.ToCharArray();
        for (int j = i; j < chars.Length; j++)
        {
            if (char.IsHighSurrogate(chars[j]) && j + 1 < chars.Length && char.IsLowSurrogate(chars[j + 1])) { j++; continue; }
            if (char.IsSurrogate(chars[j]) || chars[j] == '\uFFFE') chars[j] = '\uFFFD';
        }
        return new string(chars);
    }
}
