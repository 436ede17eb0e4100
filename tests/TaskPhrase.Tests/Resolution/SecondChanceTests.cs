using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution;

/// <summary>The second chance for out-of-scope rejections (sound-alike swaps, courtesy words) on the example registry with the real model.</summary>
[Collection(ModelCollection.Name)]
public class SecondChanceTests(ModelFixture fixture)
{
    private static readonly Lazy<TaskRegistry> Harbor = new(() => RegistryLoader.Load(TestPaths.Example("harbor-street", "registry.yaml")));

    private TaskResolver Resolver(ResolverOptions? options = null) => TaskResolver.Create(Harbor.Value, fixture.Embedder, options);

    [Theory]
    [InlineData("turn the paige", "page-turn", "paige → page (sounds alike)")]
    [InlineData("water the basel", "water-basil", "basel → basil (sounds alike)")]
    [InlineData("water the basal", "water-basil", "basal → basil (sounds alike)")]
    public void Resolve_SpeechSlipToSoundAlike_AcceptsWithReportedCorrection(string utterance, string task, string correction)
    {
        var r = Resolver().Resolve(utterance);
        Assert.Equal(ResolutionOutcome.Accepted, r.Outcome);
        Assert.Equal(task, r.Task!.Id);
        Assert.Contains(correction, r.Corrections);
        Assert.Equal(utterance, r.Utterance);
        Assert.Equal(utterance, r.Normalized);
        Assert.Contains("sound-alike", r.Detail);
    }

    [Theory]
    [InlineData("pick up the mail for me thanks", "mail-pickup", "pick up the mail")]
    [InlineData("collect the post please thanks", "mail-pickup", "collect the post please")] // the phrase's own "please" is dropped too
    [InlineData("ok, hang up my keys, thanks", "keys-hook", "hang up my keys")]
    public void Resolve_CourtesyWordsAroundAnApprovedPhrase_AcceptsAsExactMatch(string utterance, string task, string phrase)
    {
        var r = Resolver().Resolve(utterance);
        Assert.Equal(ResolutionOutcome.Accepted, r.Outcome);
        Assert.Equal(task, r.Task!.Id);
        Assert.Equal(phrase, r.Phrase);
        Assert.True(r.ExactMatch);
        Assert.Equal(utterance, r.Utterance);
        Assert.Contains("courtesy words", r.Detail);
        Assert.Empty(r.Corrections);
    }

    [Fact]
    public void Resolve_RetryOff_LeavesTheSlipRejected()
    {
        var r = Resolver(new ResolverOptions { SecondChance = false }).Resolve("turn the paige");
        Assert.Equal(ResolutionOutcome.Rejected, r.Outcome);
        Assert.Equal(RejectionReason.OutOfScope, r.Reason);
        Assert.Empty(r.Corrections);
    }

    [Fact]
    public void Resolve_RewriteBelowTheLift_KeepsTheOriginalRejection()
    {
        // With a lift of 1 no rewrite can clear accept + lift (scores are at most 1), not even an exact match.
        var r = Resolver(new ResolverOptions { SecondChanceLift = 1f }).Resolve("turn the paige");
        Assert.Equal(RejectionReason.OutOfScope, r.Reason);
        Assert.Empty(r.Corrections);
    }

    [Theory]
    [InlineData("don't water the basel")] // the rewrite is negated: refused, and the original rejection stands
    [InlineData("pick up the meal")]      // meal is two edits from mail: no swap for a four-letter word
    [InlineData("water the bagel")]       // bagel ~ basil (B240) but two edits: no swap
    public void Resolve_NoClearSoundAlike_StaysRejected(string utterance)
    {
        var r = Resolver().Resolve(utterance);
        Assert.NotEqual(ResolutionOutcome.Accepted, r.Outcome);
    }

    [Fact]
    public void ResolveMany_WithRetries_EqualsOneAtATime()
    {
        string[] utterances = ["turn the paige", "water the basel", "pick up the meal", "don't water the basel", "could you water the basil", "water the basal", "collect the post please thanks"];
        var resolver = Resolver();
        var batch = resolver.ResolveMany(utterances);
        for (int i = 0; i < utterances.Length; i++)
        {
            var one = resolver.Resolve(utterances[i]);
            Assert.Equal(one.Outcome, batch[i].Outcome);
            Assert.Equal(one.Task?.Id, batch[i].Task?.Id);
            Assert.Equal(one.Reason, batch[i].Reason);
            Assert.Equal(one.Corrections, batch[i].Corrections);
            Assert.Equal(one.Score!.Value, batch[i].Score!.Value, 1e-4);
        }
    }

    [Fact]
    public void SecondChanceLift_OutOfRange_Throws()
        => Assert.Throws<ArgumentOutOfRangeException>(() => new ResolverOptions { SecondChanceLift = 1.5f });
}
