using TaskPhrase.Text;

namespace TaskPhrase.Tests.Text;

public class SoundexTests
{
    [Theory]
    // The worked examples of the U.S. National Archives' "The Soundex Indexing System" (values from memory).
    [InlineData("Robert", "R163")]
    [InlineData("Rupert", "R163")]
    [InlineData("Rubin", "R150")]
    [InlineData("Ashcraft", "A261")] // h does not separate s and c
    [InlineData("Ashcroft", "A261")]
    [InlineData("Tymczak", "T522")]  // a vowel separates the two z/k codes
    [InlineData("Pfister", "P236")]  // the first letter's own code is not repeated
    [InlineData("Honeyman", "H555")]
    [InlineData("Lee", "L000")]      // padding
    public void Encode_ArchivesExamples_GivePublishedCodes(string word, string expected)
        => Assert.Equal(expected, Soundex.Encode(word));

    [Fact]
    public void Encode_EveryClincWord_AgreesWithIndependentImplementation()
    {
        // tests/data/soundex/soundex-reference.tsv: every distinct word of the CLINC150 queries (Larson et al., 2019)
        // coded by the npm package soundex-code 2.0.1 (an independent implementation; make_fixture.mjs writes it).
        var rows = File.ReadLines(TestPaths.Data("soundex", "soundex-reference.tsv")).Where(l => !l.StartsWith('#')).ToList();
        Assert.True(rows.Count > 5000, $"the reference file has only {rows.Count} rows");
        var mismatches = rows.Select(l => l.Split('\t')).Where(p => Soundex.Encode(p[0]) != p[1])
            .Select(p => $"{p[0]}: {Soundex.Encode(p[0])} vs {p[1]}").Take(10).ToList();
        Assert.Empty(mismatches);
    }

    [Theory]
    [InlineData("")]
    [InlineData("1st")]
    [InlineData("éclair")]
    [InlineData("'tis")]
    public void Encode_NoLeadingAsciiLetter_IsNull(string word) => Assert.Null(Soundex.Encode(word));

    [Fact]
    public void TryEncode_ShortBuffer_Throws()
        => Assert.Throws<ArgumentException>(() => Soundex.TryEncode("basil", new char[3]));
}
