using TaskPhrase.Text;

namespace TaskPhrase.Tests.Text;

public class TextNormalizerTests
{
    [Theory]
    // NFKC folds the ligature U+FB01 to "fi" and full-width letters to ASCII (Unicode Standard Annex #15).
    [InlineData("\uFB01ll the kettle", "fill the kettle")]
    [InlineData("\uFF57\uFF41\uFF54\uFF45\uFF52 the basil", "water the basil")]
    [InlineData("  water\t\tthe \n basil  ", "water the basil")]
    [InlineData("wa\u200Bter the basil", "water the basil")]
    [InlineData("\u202Ewater the basil", "water the basil")]
    [InlineData("water\u0007 the basil", "water the basil")]
    [InlineData("water\u00A0the\u3000basil", "water the basil")]
    public void Normalize_KnownInput_GivesExpected(string input, string expected)
        => Assert.Equal(expected, TextNormalizer.Normalize(input));

    [Fact]
    public void Normalize_LoneSurrogate_IsDropped()
        => Assert.Equal("ab", TextNormalizer.Normalize("a\uD800b"));

    [Theory]
    [InlineData("Water the basil.", "water the basil")]
    [InlineData("\u00BFwater the basil?!", "water the basil")]
    public void MatchKey_CaseAndEdgePunctuation_AreIgnored(string input, string expected)
        => Assert.Equal(expected, TextNormalizer.MatchKey(input));

    [Fact]
    public void Normalize_Null_ThrowsNamingParameter()
        => Assert.Equal("text", Assert.Throws<ArgumentNullException>(() => TextNormalizer.Normalize(null!)).ParamName);
}
