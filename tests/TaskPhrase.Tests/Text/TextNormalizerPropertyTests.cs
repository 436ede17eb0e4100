using System.Globalization;
using System.Text;
using CsCheck;
using TaskPhrase.Text;

namespace TaskPhrase.Tests.Text;

/// <summary>
/// Properties of <see cref="TextNormalizer.Normalize"/> over hostile Unicode (<see cref="HostileText"/>). The oracles are
/// outside TaskPhrase: .NET's own Unicode tables (<see cref="Rune.GetUnicodeCategory"/>, ICU-backed
/// <see cref="string.IsNormalized(NormalizationForm)"/>) and the UTF-16 well-formedness rule of the Unicode standard (§3.9).
/// </summary>
public class TextNormalizerPropertyTests
{
    private const int Iterations = 5_000;

    [Fact]
    public void Normalize_AnyText_NeverThrowsAndIsIdempotent()
        => HostileText.Any.Sample(text =>
        {
            string once = TextNormalizer.Normalize(text);
            string twice = TextNormalizer.Normalize(once);
            if (once != twice)
                Assert.Fail($"not idempotent: \"{HostileText.Escape(text)}\" → \"{HostileText.Escape(once)}\" → \"{HostileText.Escape(twice)}\"");
        }, iter: Iterations, threads: 1, print: HostileText.Escape);

    [Fact]
    public void Normalize_AnyText_HasNoControlFormatOrBrokenCharacters()
        => HostileText.Any.Sample(text =>
        {
            string n = TextNormalizer.Normalize(text);
            for (int i = 0; i < n.Length;)
            {
                // Rune.DecodeFromUtf16 refuses a lone surrogate: the output must be well-formed UTF-16 (Unicode §3.9, D91).
                // (Messages are built only on failure: building them for every character would dominate the run.)
                var status = Rune.DecodeFromUtf16(n.AsSpan(i), out var rune, out int used);
                if (status != System.Buffers.OperationStatus.Done)
                    Assert.Fail($"broken UTF-16 at {i} in \"{HostileText.Escape(n)}\"");
                var category = Rune.GetUnicodeCategory(rune);
                if (category is UnicodeCategory.Control or UnicodeCategory.Format or UnicodeCategory.Surrogate)
                    Assert.Fail($"U+{rune.Value:X4} ({category}) left in \"{HostileText.Escape(n)}\" from \"{HostileText.Escape(text)}\"");
                if (Rune.IsWhiteSpace(rune) && rune.Value != ' ')
                    Assert.Fail($"white space U+{rune.Value:X4} other than a space left in \"{HostileText.Escape(n)}\"");
                i += used;
            }
        }, iter: Iterations, threads: 1, print: HostileText.Escape);

    [Fact]
    public void Normalize_AnyText_HasSingleInnerSpacesOnlyAndIsNfkc()
        => HostileText.Any.Sample(text =>
        {
            string n = TextNormalizer.Normalize(text);
            // Ordinal: a culture-aware search would skip combining marks and call " \u05A6 " a double space.
            if (n.Contains("  ", StringComparison.Ordinal)) Assert.Fail($"double space in \"{HostileText.Escape(n)}\"");
            if (n.StartsWith(' ') || n.EndsWith(' ')) Assert.Fail($"untrimmed: \"{HostileText.Escape(n)}\"");
            if (!n.IsNormalized(NormalizationForm.FormKC)) Assert.Fail($"not NFKC: \"{HostileText.Escape(n)}\"");
        }, iter: Iterations, threads: 1, print: HostileText.Escape);

    [Fact]
    public void MatchKey_AnyText_NeverThrowsAndIsStable()
        => HostileText.Any.Sample(text =>
        {
            string key = TextNormalizer.MatchKey(text);
            Assert.Equal(key, TextNormalizer.MatchKey(key));
        }, iter: Iterations, threads: 1, print: HostileText.Escape);

    // Regressions found by the properties above (CsCheck seeds 7CqxidW_PzG1 and 28B1V4RDYVJ1).
    [Theory]
    [InlineData("\uFFFE", "")]                       // .NET's ICU NFKC throws ArgumentException on U+FFFE
    [InlineData("water\uFFFE the basil", "water the basil")]
    [InlineData("\u00ADQ\uFFFE", "Q")]
    public void Normalize_NoncharacterFFFE_IsDroppedNotThrown(string input, string expected)
        => Assert.Equal(expected, TextNormalizer.Normalize(input));

    [Fact]
    public void MatchKey_LowerCasingExposesComposition_KeyIsStable()
    {
        // U+FF28 (fullwidth H) + U+0331 → NFKC "H\u0331" → lower "h\u0331", which NFKC composes to U+1E96
        // (Unicode data: U+1E96 LATIN SMALL LETTER H WITH LINE BELOW = 0068 0331).
        string key = TextNormalizer.MatchKey("\uFF28\u0331");
        Assert.Equal("\u1E96", key);
        Assert.Equal(key, TextNormalizer.MatchKey(key));
        Assert.Equal(key, TextNormalizer.MatchKey("\u1E96"));
    }
}
