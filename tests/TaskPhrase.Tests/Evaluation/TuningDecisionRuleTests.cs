using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using static TaskPhrase.Tests.Evaluation.TuningTestData;

namespace TaskPhrase.Tests.Evaluation;

// The expected outcomes follow the design's decision procedure (product.md, steps 3, 6, 7 and 10).
public class TuningDecisionRuleTests
{
    private static readonly DecisionRule Rule = new(0.60f, 0.04f);

    [Fact]
    public void Apply_ExactMatch_IsAcceptedEvenBelowThresholdAndGuarded()
    {
        var p = InScope("hall-light", "hall-light", 0.1f, "keys-hook", 0.1f, guard: true, exact: true);
        Assert.Equal(new RuleDecision(ResolutionOutcome.Accepted, "hall-light"), Rule.Apply(p));
    }

    [Fact]
    public void Apply_Guarded_IsRejectedWhateverTheScore()
        => Assert.Equal(ResolutionOutcome.Rejected, Rule.Apply(InScope("hall-light", "hall-light", 0.99f, guard: true)).Outcome);

    [Theory]
    [InlineData(0.59f, ResolutionOutcome.Rejected)]
    [InlineData(0.60f, ResolutionOutcome.Accepted)] // the threshold itself is reached ("below accept" rejects)
    public void Apply_ScoreAgainstAccept_DecidesRejection(float score, ResolutionOutcome expected)
        => Assert.Equal(expected, Rule.Apply(InScope("hall-light", "hall-light", score)).Outcome);

    [Fact]
    public void Apply_GapBelowMargin_IsAmbiguousWithBestTask()
        => Assert.Equal(new RuleDecision(ResolutionOutcome.Ambiguous, "hall-light"),
            Rule.Apply(InScope("hall-light", "hall-light", 0.80f, "keys-hook", 0.78f)));

    [Fact]
    public void Apply_GapAtLeastMargin_IsAccepted()
        => Assert.Equal(new RuleDecision(ResolutionOutcome.Accepted, "hall-light"),
            Rule.Apply(InScope("hall-light", "hall-light", 0.80f, "keys-hook", 0.75f)));

    [Fact]
    public void Apply_NoRunnerUp_IsNeverAmbiguous()
        => Assert.Equal(ResolutionOutcome.Accepted, Rule.Apply(InScope("hall-light", "hall-light", 0.61f, null, 0.61f)).Outcome);

    [Fact]
    public void Apply_NaNScore_IsRejected()
        => Assert.Equal(ResolutionOutcome.Rejected, Rule.Apply(InScope("hall-light", "hall-light", float.NaN)).Outcome);

    [Fact]
    public void Apply_PerTaskOverride_AppliesOnlyToThatTask()
    {
        var rule = new DecisionRule(0.60f, 0.04f, new Dictionary<string, float> { ["kettle-pour"] = 0.75f });
        Assert.Equal(ResolutionOutcome.Rejected, rule.Apply(InScope("kettle-pour", "kettle-pour", 0.70f)).Outcome);
        Assert.Equal(ResolutionOutcome.Accepted, rule.Apply(InScope("hall-light", "hall-light", 0.70f)).Outcome);
    }

    [Fact]
    public void Apply_ExactMatchWithoutTask_ThrowsNamingTheUtterance()
    {
        var p = new ScoredProbe(new ProbeCase("water the basil", "water-basil", Line: 4), null, 1f, null, 0, false, true);
        var ex = Assert.Throws<ArgumentException>(() => Rule.Apply(p));
        Assert.Contains("water the basil", ex.Message);
        Assert.Contains("line 4", ex.Message);
    }

    [Fact]
    public void FromRegistry_PerTaskValues_BecomeOverrides()
    {
        var registry = new TaskRegistry(
        [
            new TaskDefinition { Id = "kettle-pour", Title = "Pour", Accept = 0.7f, Margin = 0.06f, Controller = new("pour-arc.v2", 2), Phrases = ["pour the tea"] },
            new TaskDefinition { Id = "hall-light", Title = "Light", Controller = new("reach-press.v1", 1), Phrases = ["press the light"] },
        ], new RegistryDefaults(0.55f, 0.03f), "hash");
        var rule = DecisionRule.FromRegistry(registry);
        Assert.Equal(0.7f, rule.AcceptFor("kettle-pour"));
        Assert.Equal(0.06f, rule.MarginFor("kettle-pour"));
        Assert.Equal(0.55f, rule.AcceptFor("hall-light"));
        Assert.Equal(0.03f, rule.MarginFor("hall-light"));
    }

    [Theory]
    [InlineData(float.NaN, 0.04f)]
    [InlineData(0.6f, -0.01f)]
    [InlineData(float.PositiveInfinity, 0.04f)]
    public void Constructor_InvalidThresholds_Throw(float accept, float margin)
        => Assert.Throws<ArgumentOutOfRangeException>(() => new DecisionRule(accept, margin));

    [Fact]
    public void Evaluate_CountsByAuditDefinitions()
    {
        ScoredProbe[] probes =
        [
            InScope("hall-light", "hall-light", 0.9f),             // correct
            InScope("hall-light", "keys-hook", 0.9f),              // wrong task
            InScope("hall-light", "hall-light", 0.3f),             // false reject (below accept)
            InScope("hall-light", "hall-light", 0.9f, "keys-hook", 0.89f), // false reject (ambiguous)
            OutOfScope("hall-light", 0.9f),                        // false accept
            OutOfScope("hall-light", 0.9f, guard: true),           // correctly rejected
        ];
        var m = TuningMetrics.Evaluate(probes, Rule);
        Assert.Equal((1, 4), (m.InScopeAccuracy.Count, m.InScopeAccuracy.Total));
        Assert.Equal(1, m.WrongTaskRate.Count);
        Assert.Equal(2, m.FalseRejectRate.Count);
        Assert.Equal((1, 2), (m.FalseAcceptRate.Count, m.FalseAcceptRate.Total));
    }
}
