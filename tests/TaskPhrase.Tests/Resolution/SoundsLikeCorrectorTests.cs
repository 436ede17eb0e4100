using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution;

public class SoundsLikeCorrectorTests
{
    private static readonly string[] Vocabulary = ["pick", "up", "the", "mail", "water", "basil", "turn", "page", "feed", "fish", "food", "hall", "light", "pill", "blanket"];

    private static (string Text, IReadOnlyList<(string From, string To)> Swaps)? Propose(string text)
        => SoundsLikeCorrector.Propose(text, Vocabulary.ToHashSet(StringComparer.Ordinal), Vocabulary, HazardLexicon.BuiltIn);

    [Theory]
    // Speech-recognition slips that give another real word (common practice: homophones and near-homophones).
    [InlineData("water the basel", "water the basil")]
    [InlineData("water the basal", "water the basil")]
    [InlineData("turn the paige", "turn the page")]
    [InlineData("fetch the blankette", "fetch the blanket")] // seven letters or more: two edits allowed
    public void Propose_SoundAlikeOfRegistryWord_IsSwapped(string utterance, string expected)
    {
        var p = Propose(utterance);
        Assert.NotNull(p);
        Assert.Equal(expected, p.Value.Text);
    }

    [Theory]
    [InlineData("water the basil")]            // nothing to repair
    [InlineData("bring me the fan")]           // fan (F500) has no registry word with its code
    [InlineData("don't water the basil")]      // negation cues are never touched
    [InlineData("pick up the knife")]          // nor hazard words (knife is an instrument)
    [InlineData("feet the fish")]              // feet is a hazard target, so it is never swapped for feed
    [InlineData("open the bill")]              // bill (B400) ≠ pill (P400): the first letter counts
    [InlineData("pick up the mellow")]         // mellow and mail share M400 but are three edits apart
    [InlineData("pick up the male")]           // two edits from mail: too far for a four-letter word ("meal" is two too)
    [InlineData("feed the fiche")]             // two edits from fish: too far for a five-letter word ("bagel" ~ "basil")
    public void Propose_NoCloseSoundAlike_IsNull(string utterance) => Assert.Null(Propose(utterance));

    [Fact]
    public void Propose_TwoEquallyCloseCandidates_LeavesTheWordAlone()
    {
        // "bast" is one edit from both "best" and "bust" (all B230): ambiguous, so no swap.
        var vocab = new[] { "best", "bust" };
        Assert.Null(SoundsLikeCorrector.Propose("the bast one", vocab.ToHashSet(StringComparer.Ordinal), vocab, HazardLexicon.BuiltIn));
        var one = new[] { "best" };
        Assert.Equal("the best one", SoundsLikeCorrector.Propose("the bast one", one.ToHashSet(StringComparer.Ordinal), one, HazardLexicon.BuiltIn)?.Text);
    }

    [Fact]
    public void Propose_ReportsEverySwap()
    {
        var p = Propose("water the basel and turn the paige");
        Assert.NotNull(p);
        Assert.Equal("water the basil and turn the page", p.Value.Text);
        Assert.Equal([("basel", "basil"), ("paige", "page")], p.Value.Swaps);
    }
}
