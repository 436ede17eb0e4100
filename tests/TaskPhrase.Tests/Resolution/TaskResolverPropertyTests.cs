using CsCheck;
using TaskPhrase.Resolution;
using TaskPhrase.Tests.Text;
using TaskPhrase.Text;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// Properties of <see cref="TaskResolver.Resolve"/> with the real model over hostile text (<see cref="HostileText"/>):
/// it never throws, the outcome and reason always agree, the same input always gives the same resolution, input is
/// capped at <see cref="ResolverOptions.MaxInputChars"/> (default 1,000 normalised characters: longer input is cut and
/// flagged), and every resolution can be written as JSON. 200 generated cases, each resolved twice (model calls only for
/// the cases that pass the early steps).
/// </summary>
[Collection(ModelCollection.Name)]
public class TaskResolverPropertyTests(ModelFixture fixture)
{
    private const int Cases = 200;

    internal static void AssertValidPair(TaskPhrase.Resolution.Resolution r)
    {
        switch (r.Outcome)
        {
            case ResolutionOutcome.Accepted:
                Assert.Equal(RejectionReason.None, r.Reason);
                Assert.NotNull(r.Task);
                break;
            case ResolutionOutcome.Ambiguous:
                Assert.Equal(RejectionReason.Ambiguous, r.Reason);
                Assert.True(r.Candidates.Count >= 2, "an ambiguous resolution lists both candidates");
                break;
            case ResolutionOutcome.Rejected:
                Assert.NotEqual(RejectionReason.None, r.Reason);
                Assert.NotEqual(RejectionReason.Ambiguous, r.Reason);
                break;
            default:
                Assert.Fail($"outcome {r.Outcome} is not defined");
                break;
        }
        Assert.True(Enum.IsDefined(r.Reason), $"reason {r.Reason} is not defined");
    }

    /// <summary>Everything about a resolution except how long it took.</summary>
    internal static string Fingerprint(TaskPhrase.Resolution.Resolution r) => ResolutionJson.ToJson(r with { Elapsed = TimeSpan.Zero });

    [Fact]
    public void Resolve_HostileText_NeverThrowsValidDeterministicAndCapped()
    {
        var resolver = TaskResolver.Create(HarborMini.Registry(), fixture.Embedder);
        int cap = new ResolverOptions().MaxInputChars;
        Assert.Equal(1000, cap); // the documented default (ResolverOptions.MaxInputChars, docs/reliability.md)
        HostileText.AroundPhrases(HarborMini.Phrases).Sample(text =>
        {
            var first = resolver.Resolve(text);
            var second = resolver.Resolve(text);
            AssertValidPair(first);
            Assert.Equal(Fingerprint(first), Fingerprint(second));
            Assert.Equal(text, first.Utterance);
            string normalized = TextNormalizer.Normalize(text);
            if (normalized.Length > cap)
            {
                Assert.True(first.Truncated, "input over the cap must be flagged");
                Assert.InRange(first.Normalized.Length, cap - 1, cap);
                Assert.StartsWith(first.Normalized, normalized, StringComparison.Ordinal);
            }
            else
            {
                Assert.Equal(normalized, first.Normalized);
            }
        }, iter: Cases, threads: 1, print: HostileText.Escape);
    }
}
