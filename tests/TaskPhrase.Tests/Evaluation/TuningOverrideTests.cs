using CsCheck;
using TaskPhrase.Evaluation;
using static TaskPhrase.Tests.Evaluation.TuningTestData;

namespace TaskPhrase.Tests.Evaluation;

public class TuningOverrideTests
{
    // Task hall-light scores high (12 in-scope probes at 0.70..0.81) and attracts out-of-scope probes at 0.65;
    // task keys-hook scores low (12 in-scope probes at 0.50..0.61) and its nearest out-of-scope probes sit at 0.45.
    // With no false accept allowed, one global threshold must exceed 0.65 and loses every keys-hook probe.
    private static ScoredProbe[] TwoTaskSuite(int keysProbes = 12)
    {
        var probes = new List<ScoredProbe>();
        for (int i = 0; i < 12; i++) probes.Add(InScope("hall-light", "hall-light", 0.70f + i * 0.01f));
        for (int i = 0; i < keysProbes; i++) probes.Add(InScope("keys-hook", "keys-hook", 0.50f + i * 0.01f));
        for (int i = 0; i < 3; i++) probes.Add(OutOfScope("hall-light", 0.65f));
        for (int i = 0; i < 3; i++) probes.Add(OutOfScope("keys-hook", 0.45f));
        return probes.ToArray();
    }

    [Fact]
    public void TuneForBudgets_TaskWithEnoughProbes_GetsLoweredOverride()
    {
        var tuner = new ThresholdTuner(new TuningOptions { MaxOverrideShift = 0.25f });
        var result = tuner.TuneForBudgets(TwoTaskSuite(), new TuningBudgets(0));
        // Global: (0.65, 0.70], midpoint 0.675 written 0.68. keys-hook: (0.45, 0.50], midpoint 0.475 written 0.48.
        Assert.Equal(0.68f, result.Accept);
        Assert.Equal(new Dictionary<string, float> { ["keys-hook"] = 0.48f }, result.AcceptOverrides);
        Assert.Equal(24, result.Metrics.InScopeAccuracy.Count);
        Assert.Equal(0, result.Metrics.FalseAcceptRate.Count);
        Assert.True(result.Feasible);
    }

    [Fact]
    public void TuneForBudgets_OverrideShift_IsBounded()
    {
        // Default shift 0.10: keys-hook can go down to 0.58 only, gaining its probes at 0.58..0.61.
        var result = new ThresholdTuner().TuneForBudgets(TwoTaskSuite(), new TuningBudgets(0));
        float o = result.AcceptOverrides["keys-hook"];
        Assert.InRange(o, result.Accept - 0.10f - 1e-6f, 0.58f);
        Assert.Equal(12 + 4, result.Metrics.InScopeAccuracy.Count);
    }

    [Fact]
    public void TuneForBudgets_TaskBelowMinimumProbes_GetsNoOverrideAndANote()
    {
        var result = new ThresholdTuner(new TuningOptions { MaxOverrideShift = 0.25f }).TuneForBudgets(TwoTaskSuite(keysProbes: 9), new TuningBudgets(0));
        Assert.Empty(result.AcceptOverrides);
        Assert.Contains(result.Notes, n => n.Contains("'keys-hook' has 9 in-scope probes, fewer than 10"));
    }

    [Fact]
    public void TuneForBudgets_OverridesDisabled_GivesNone()
        => Assert.Empty(new ThresholdTuner(new TuningOptions { AllowOverrides = false }).TuneForBudgets(TwoTaskSuite(), new TuningBudgets(0)).AcceptOverrides);

    [Fact]
    public void TuneForBudgets_LoweringWouldFalseAcceptNearestProbes_IsRefused()
    {
        // Move keys-hook's out-of-scope neighbours above its in-scope probes: lowering keys-hook would accept them.
        var probes = TwoTaskSuite().Select(p => !p.Probe.IsInScope && p.BestTask == "keys-hook" ? p with { BestScore = 0.62f } : p).ToArray();
        var result = new ThresholdTuner(new TuningOptions { MaxOverrideShift = 0.25f }).TuneForBudgets(probes, new TuningBudgets(0));
        Assert.Empty(result.AcceptOverrides);
        Assert.Equal(12, result.Metrics.InScopeAccuracy.Count);
    }

    [Fact]
    public void TuneForBudgets_RaisingOneTaskFreesBudget_LowersAnother()
    {
        // Five out-of-scope probes, one false accept allowed (budget 0.25). hall-light's neighbour sits at 0.725 among
        // its in-scope probes (0.70..0.81); keys-hook's at 0.555 among its own (0.50..0.61), three more at 0.40.
        // One global threshold: spend the false accept on hall-light and stop above 0.555: 12 + 6 = 18 correct,
        // threshold in (0.555, 0.56], midpoint 0.5575 written 0.558.
        // Per task: raise hall-light above 0.725 (loses 0.70, 0.71, 0.72: 9 left, midpoint of (0.725, 0.73] written
        // 0.728) and lower keys-hook to (0.40, 0.50] (all 12, one false accept: 1 of its 4 neighbours,
        // within the budget on that task's probes too): 21.
        var probes = new List<ScoredProbe>();
        for (int i = 0; i < 12; i++) probes.Add(InScope("hall-light", "hall-light", 0.70f + i * 0.01f));
        for (int i = 0; i < 12; i++) probes.Add(InScope("keys-hook", "keys-hook", 0.50f + i * 0.01f));
        probes.Add(OutOfScope("hall-light", 0.725f));
        probes.Add(OutOfScope("keys-hook", 0.555f));
        probes.Add(OutOfScope("keys-hook", 0.40f));
        probes.Add(OutOfScope("keys-hook", 0.40f));
        probes.Add(OutOfScope("keys-hook", 0.40f));
        var budgets = new TuningBudgets(0.25);

        var global = new ThresholdTuner(new TuningOptions { AllowOverrides = false }).TuneForBudgets(probes, budgets);
        Assert.Equal(18, global.Metrics.InScopeAccuracy.Count);
        Assert.Equal(0.558f, global.Accept);

        var result = new ThresholdTuner(new TuningOptions { MaxOverrideShift = 0.25f }).TuneForBudgets(probes, budgets);
        Assert.Equal(new Dictionary<string, float> { ["hall-light"] = 0.728f, ["keys-hook"] = 0.45f }, result.AcceptOverrides);
        Assert.Equal(21, result.Metrics.InScopeAccuracy.Count);
        Assert.Equal(1, result.Metrics.FalseAcceptRate.Count);
    }

    [Fact]
    public void TuneForBudgets_RandomSuites_OverridesOnlyHelpAndKeepBudgets()
    {
        var withOverrides = new ThresholdTuner(new TuningOptions { MinProbesForOverride = 5 });
        var globalOnly = new ThresholdTuner(new TuningOptions { AllowOverrides = false });
        int withAny = 0;
        Gen.Select(Suite, Budgets).Sample((probes, budgets) =>
        {
            var global = globalOnly.TuneForBudgets(probes, budgets);
            var result = withOverrides.TuneForBudgets(probes, budgets);
            Assert.Equal(global.Feasible, result.Feasible);
            var m = TuningMetrics.Evaluate(probes, result.Rule);
            Assert.Equal(m, result.Metrics);
            if (!result.Feasible) { Assert.Empty(result.AcceptOverrides); return; }
            Assert.True(m.FalseAcceptRate.Value <= budgets.MaxFalseAccept);
            if (budgets.MaxWrongTask is { } cap) Assert.True(m.WrongTaskRate.Value <= cap);
            if (result.AcceptOverrides.Count == 0) { Assert.Equal(global.Metrics, result.Metrics); return; }
            Interlocked.Increment(ref withAny);
            Assert.True(m.InScopeAccuracy.Count > global.Metrics.InScopeAccuracy.Count, "an override must raise accuracy");
            Assert.Equal(global.Accept, result.Accept);
            foreach (var (task, value) in result.AcceptOverrides)
            {
                Assert.True(probes.Count(p => p.Probe.IsInScope && p.Probe.Expect == task) >= 5);
                Assert.InRange(value, result.Accept - 0.10f - 1e-6f, result.Accept + 0.10f + 1e-6f);
            }
        }, iter: 300);
        Assert.True(withAny > 0, "the random suites never produced an override, so the property was not exercised");
    }
}
