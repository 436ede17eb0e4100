using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution;

public class CourtesyTrimTests
{
    [Theory]
    [InlineData("ok, hang up my keys, thanks", "hang up my keys")]
    [InlineData("could you please water the basil for me please", "water the basil")]
    [InlineData("Can you turn the page now?", "turn the page")]
    [InlineData("pick up the mail thank you", "pick up the mail")]
    [InlineData("i'd like you to open the latch if you can", "open the latch")]
    public void Trim_EdgeCourtesyPhrases_AreDropped(string text, string expected)
        => Assert.Equal(expected, CourtesyTrim.Trim(text)?.Text);

    [Theory]
    [InlineData("water the basil")] // nothing to drop
    [InlineData("please help")]     // dropping "please" would leave one word
    [InlineData("thanks")]
    public void Trim_NothingToDropOrOneWordLeft_IsNull(string text) => Assert.Null(CourtesyTrim.Trim(text));

    [Fact]
    public void Trim_TwoWordsLeft_IsAllowed() => Assert.Equal("hall light", CourtesyTrim.Trim("hall light please")?.Text);

    [Fact]
    public void Trim_WordsInsideTheCommand_AreKept()
    {
        // Courtesy words only go at the edges; a negation is never a courtesy word.
        Assert.Equal("don't water the basil", CourtesyTrim.Trim("please don't water the basil thanks")?.Text);
        Assert.Equal("water the basil please and then stop", CourtesyTrim.Trim("ok water the basil please and then stop")?.Text);
        Assert.Null(CourtesyTrim.Trim("water the basil please and then stop"));
    }

    [Fact]
    public void Trim_ReportsWhatWasDropped()
        => Assert.Equal(["ok", "thanks"], CourtesyTrim.Trim("ok hang up my keys thanks")!.Value.Dropped);
}
