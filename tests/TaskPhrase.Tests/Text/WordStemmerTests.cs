using TaskPhrase.Text;

namespace TaskPhrase.Tests.Text;

public class WordStemmerTests
{
    [Theory]
    // Snowball English (Porter 2) stemmer, as in its published sample vocabulary and output (snowballstem.org; from memory).
    [InlineData("caresses", "caress")]
    [InlineData("ponies", "poni")]
    [InlineData("generously", "generous")]
    [InlineData("running", "run")]
    [InlineData("hopping", "hop")]
    [InlineData("agreed", "agre")]
    // Words of the hazard lexicon and the scenario, so inflected forms meet their stems.
    [InlineData("throwing", "throw")]
    [InlineData("watering", "water")]
    [InlineData("keys", "key")]
    public void Stem_KnownWord_GivesSnowballStem(string word, string stem) => Assert.Equal(stem, WordStemmer.Stem(word));

    [Fact]
    public void Words_FoldsCaseAndTypographicApostrophes()
        => Assert.Equal(["don't", "water", "noor's", "basil"], WordStemmer.Words("DON\u2019T water Noor's basil!"));
}
