using CsCheck;

namespace TaskPhrase.Tests.Text;

/// <summary>
/// Generators of hostile text for property tests: arbitrary UTF-16 (lone surrogates included), control, format and
/// zero-width characters, bidi overrides and isolates, combining marks, emoji, compatibility characters that NFKC
/// rewrites, noncharacters, several scripts mixed, and plain command words so that some cases reach the later steps
/// of the decision procedure.
/// </summary>
internal static class HostileText
{
    /// <summary>Plain words of the Harbor Street scenario, so that generated text is sometimes close to a command.</summary>
    public static readonly string[] Words =
        ["water", "the", "basil", "turn", "on", "hall", "light", "feed", "fish", "don't", "please", "kettle", "never", "throw", "away", "and"];

    private static Gen<string> Chars(char lo, char hi) => Gen.Char[lo, hi].Select(c => c.ToString());

    private static Gen<string> CodePoints(int lo, int hi) => Gen.Int[lo, hi].Select(char.ConvertFromUtf32);

    /// <summary>One piece of text: a character, a code point or a word from one of the hostile classes.</summary>
    public static Gen<string> Piece { get; } = Gen.Frequency(
        (6, Gen.OneOfConst(Words)),
        (4, Chars(' ', '~')),                                                    // printable ASCII
        (2, Gen.OneOfConst(" ", "  ", "\t", "\n", "\r\n", "\u00A0", "\u2028", "\u2029", "\u3000", "\u1680", "\u0085")),
        (2, Gen.Char.Select(c => c.ToString())),                                 // any UTF-16 unit, lone surrogates included
        (2, Chars('\uD800', '\uDFFF')),                                          // lone surrogates
        (2, Gen.OneOf(Chars('\0', '\u001F'), Chars('\u007F', '\u009F'))),        // C0 and C1 controls, NUL included
        (2, Gen.OneOfConst("\u200B", "\u200C", "\u200D", "\u2060", "\uFEFF", "\u00AD", "\u180E", "\u2061", "\uFFF9")), // zero-width and format
        (2, Gen.OneOfConst("\u202A", "\u202B", "\u202C", "\u202D", "\u202E", "\u2066", "\u2067", "\u2068", "\u2069", "\u200E", "\u200F", "\u061C")), // bidi
        (2, Chars('\u0300', '\u036F')),                                          // combining diacritics
        (1, Chars('\u1100', '\u11FF')),                                          // Hangul jamo (NFKC composes them)
        (1, Chars('\uAC00', '\uD7A3')),                                          // Hangul syllables
        (2, CodePoints(0x1F300, 0x1FAFF)),                                       // emoji
        (1, Gen.OneOfConst("\U0001F469\u200D\U0001F373", "\U0001F1EC\U0001F1E7", "\u2764\uFE0F", "\U0001F44B\U0001F3FD")), // ZWJ, flags, variation, skin tone
        (2, Gen.OneOf(Chars('\u0400', '\u04FF'), Chars('\u0600', '\u06FF'), Chars('\u0900', '\u097F'), Chars('\u4E00', '\u9FFF'), Chars('\u0590', '\u05FF'))), // scripts
        (2, Gen.OneOf(Chars('\uFB00', '\uFB06'), Chars('\uFF01', '\uFF5E'), Chars('\u2460', '\u24FF'), Gen.OneOfConst("\uFDFA", "\u3392", "\u2126", "\u212B", "\u1E9B\u0323"))), // compatibility
        (1, Gen.OneOfConst("\uFFFE", "\uFFFF", "\uFDD0", "\uFDEF", "\U0001FFFE", "\U0010FFFF", "\uFFFD")), // noncharacters and the replacement character
        (1, Chars('\uE000', '\uF8FF')),                                          // private use
        (1, CodePoints(0x10000, 0x10FFFF)));                                     // any supplementary code point

    /// <summary>Hostile text of 0 to 40 pieces.</summary>
    public static Gen<string> Any { get; } = Piece.Array[0, 40].Select(string.Concat);

    /// <summary>Hostile text, sometimes an approved phrase with hostile pieces around and inside it, sometimes very long.</summary>
    public static Gen<string> AroundPhrases(IReadOnlyList<string> phrases) => Gen.Frequency(
        (6, Any),
        (2, Gen.Select(Gen.OneOfConst(phrases.ToArray()), Piece.Array[0, 4], Piece.Array[0, 4], Gen.Int[0, 3])
            .Select((phrase, before, after, casing) => string.Concat(before) + Recase(phrase, casing) + string.Concat(after))),
        (1, Gen.Select(Gen.OneOfConst(phrases.ToArray()), Gen.OneOfConst("\u200B", "\u00AD", "\u202E", "\u0301"))
            .Select((phrase, inside) => string.Join(inside, phrase.Split(' ')))),
        (1, Gen.Select(Any, Gen.Int[30, 120]).Select((text, times) => string.Concat(Enumerable.Repeat(text + " ", times)))));

    private static string Recase(string text, int casing) => casing switch
    {
        0 => text,
        1 => text.ToUpperInvariant(),
        2 => "  " + text + "!!",
        _ => string.Concat(text.Select((c, i) => i % 2 == 0 ? char.ToUpperInvariant(c) : c)),
    };

    /// <summary>Shows text with every non-ASCII or control character escaped, for failure messages.</summary>
    public static string Escape(string text)
        => string.Concat(text.Select(c => c is >= ' ' and <= '~' ? c.ToString() : $"\\u{(int)c:X4}"));
}
