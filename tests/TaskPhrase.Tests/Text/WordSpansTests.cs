using CsCheck;
using TaskPhrase.Text;

namespace TaskPhrase.Tests.Text;

/// <summary>
/// The allocation-free word and stem helpers of the resolver's hot path against the public string forms they
/// replace (differential testing, common practice): <see cref="WordSpans"/> against <see cref="WordStemmer.Words"/>,
/// <see cref="WordStemmer.StemSpan"/> against <see cref="WordStemmer.Stem"/> (Lucene.Net's Snowball English stemmer),
/// on the CLINC150 utterances (Larson et al., 2019) and on generated text full of the awkward characters.
/// </summary>
public class WordSpansTests
{
    /// <summary>CLINC150 train and validation utterances plus the Harbor Street probes.</summary>
    private static IEnumerable<string> Corpus()
        => new[] { "train", "val", "oos_train", "oos_val" }.SelectMany(s => Clinc150.Split(s)).Select(r => r.Text)
            .Concat(File.ReadLines(TestPaths.Example("harbor-street", "probes.csv")).Skip(1).Select(l => l.Split(',')[0]));

    [Fact]
    public void WordSpans_Corpus_EqualWords()
    {
        int checkedTexts = 0;
        foreach (var text in Corpus())
        {
            AssertSameWords(text);
            checkedTexts++;
        }
        Assert.True(checkedTexts > 15_000, $"only {checkedTexts} texts");
    }

    [Fact]
    public void WordSpans_GeneratedText_EqualWords()
        => Gen.Char["ab Z9'`\u2019\u2018\u02BC-.,!\u00C9\u0130\u00DF\u3000\t\uD83D\uDE42x"].Array[0, 40].Select(c => new string(c))
            .Sample(AssertSameWords, iter: 5000);

    [Fact]
    public void StemSpan_CorpusWords_EqualStem()
    {
        var words = Corpus().SelectMany(WordStemmer.Words).Distinct().ToList();
        Assert.True(words.Count > 5000, $"only {words.Count} distinct words");
        foreach (var w in words) Assert.Equal(WordStemmer.Stem(w), WordStemmer.StemSpan(w).ToString());
        // Interleaved with the string form on the same thread: neither disturbs the other's state.
        Assert.Equal("run", WordStemmer.StemSpan("running").ToString());
        Assert.Equal("hous", WordStemmer.Stem("houses"));
        Assert.Equal("bake", WordStemmer.StemSpan("baked").ToString());
    }

    [Fact]
    public void StemSpan_LongWord_EqualStem()
    {
        string word = string.Concat(Enumerable.Repeat("internationalization", 8));
        Assert.Equal(WordStemmer.Stem(word), WordStemmer.StemSpan(word).ToString());
    }

    private static void AssertSameWords(string text)
    {
        var expected = WordStemmer.Words(text);
        using var spans = new WordSpans(text);
        var actual = new List<string>();
        for (int i = 0; i < spans.Count; i++) actual.Add(spans[i].ToString());
        Assert.Equal(expected, actual);
    }
}
