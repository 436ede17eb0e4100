using TaskPhrase.Resolution;
using TaskPhrase.Text;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// The span overloads of the lexical guards against their public string overloads (differential testing, common
/// practice) on the CLINC150 utterances (Larson et al., 2019), the Harbor Street probes and hand-made negated and
/// possessive commands: same cue, same hazard, same possessive target.
/// </summary>
public class LexicalSpanTests
{
    private static readonly string[] Handmade =
    [
        "no blanket thanks", "do not turn on the hall light", "don't water the basil", "please stop", "no more tea",
        "leave alone the kettle", "hold off on the mail", "not now", "no", "no no", "give my hand a squeeze",
        "put it in your hand", "pass noor's keys", "wave at my head", "throw the remote", "the kettle's on my lap",
        "it's not anymore needed", "NO THANKS", "Don\u2019t do that", "no need for the light",
    ];

    private static IEnumerable<string> Corpus()
        => new[] { "val", "oos_val", "train" }.SelectMany(s => Clinc150.Split(s)).Select(r => r.Text)
            .Concat(File.ReadLines(TestPaths.Example("harbor-street", "probes.csv")).Skip(1).Select(l => l.Split(',')[0]))
            .Concat(Handmade);

    [Fact]
    public void Find_Spans_EqualsFindOnWords()
    {
        int cues = 0;
        foreach (var text in Corpus())
        {
            var words = WordStemmer.Words(text);
            using var spans = new WordSpans(text);
            var expected = NegationCues.Find(words);
            Assert.Equal(expected, NegationCues.Find(spans));
            if (expected is not null) cues++;
        }
        Assert.True(cues > 100, $"only {cues} texts with a cue");
    }

    [Fact]
    public void FindPossessiveTarget_Spans_EqualsStringOverload()
    {
        var covered = new HashSet<string>(new[] { "hand", "pass", "key" }.Select(WordStemmer.Stem), StringComparer.Ordinal);
        var empty = new HashSet<string>(StringComparer.Ordinal);
        int hits = 0;
        foreach (var text in Corpus())
        {
            var words = WordStemmer.Words(text);
            using var spans = new WordSpans(text);
            foreach (var set in new[] { covered, empty })
            {
                var expected = HazardLexicon.BuiltIn.FindPossessiveTarget(words, set);
                Assert.Equal(expected, HazardLexicon.BuiltIn.FindPossessiveTarget(spans, set));
                if (expected is not null) hits++;
            }
        }
        Assert.True(hits >= 4, $"only {hits} possessive targets found");
    }

    [Fact]
    public void FindIn_Array_EqualsEnumerable()
    {
        int hits = 0;
        foreach (var text in Corpus())
        {
            var words = WordStemmer.Words(text).ToArray();
            var expected = HazardLexicon.BuiltIn.FindIn(words.AsEnumerable().Select(w => w));
            Assert.Equal(expected, HazardLexicon.BuiltIn.FindIn(words));
            if (expected is not null) hits++;
        }
        Assert.True(hits > 100, $"only {hits} hazard words found");
    }
}
