using CsCheck;
using TaskPhrase.Evaluation;
using static TaskPhrase.Tests.Evaluation.TuningTestData;

namespace TaskPhrase.Tests.Evaluation;

public class TuningBudgetSearchTests
{
    private static readonly ThresholdTuner GlobalOnly = new(new TuningOptions { AllowOverrides = false });

    [Fact]
    public void TuneForBudgets_RandomSuites_MatchesBruteForceOracle()
    {
        // Differential check against an exhaustive search that judges every candidate pair with DecisionRule.Apply.
        Gen.Select(Suite, Budgets).Sample((probes, budgets) =>
        {
            var result = GlobalOnly.TuneForBudgets(probes, budgets);
            var oracle = TuningOracle.Best(probes, budgets, TuningOptions.Default.MarginGrid);

            Assert.Equal(oracle.Feasible, result.Feasible);
            Assert.Equal(oracle.Metrics.InScopeAccuracy.Count, result.Metrics.InScopeAccuracy.Count);
            Assert.Equal(oracle.Violation, result.Violation, 12);
            // Same tie-break (stricter accept, then larger margin) means the same decision on every probe.
            var rule = new DecisionRule(result.Accept, result.Margin);
            foreach (var p in probes) Assert.Equal(oracle.Rule.Apply(p), rule.Apply(p));
            // The reported figures are those of the decision rule, and the budgets hold when feasible.
            var recomputed = TuningMetrics.Evaluate(probes, rule);
            Assert.Equal(recomputed, result.Metrics);
            if (result.Feasible)
            {
                Assert.True(recomputed.FalseAcceptRate.Value <= budgets.MaxFalseAccept);
                if (budgets.MaxWrongTask is { } cap) Assert.True(recomputed.WrongTaskRate.Value <= cap);
            }
            Assert.InRange(result.Margin, 0f, 0.10f);
        }, iter: 200);
    }

    [Fact]
    public void TuneForBudgets_GridOnly_MatchesOracleOnGrid()
    {
        var tuner = new ThresholdTuner(new TuningOptions { AllowOverrides = false, IncludeGapMargins = false, MarginGrid = [0f, 0.03f, 0.07f] });
        Gen.Select(Suite, Budgets).Sample((probes, budgets) =>
        {
            var result = tuner.TuneForBudgets(probes, budgets);
            // With gap margins disabled only the grid is searched; the oracle searches the same grid exhaustively.
            var oracle = TuningOracle.Best(probes, budgets, [0f, 0.03f, 0.07f], includeGaps: false);
            Assert.Equal(oracle.Feasible, result.Feasible);
            Assert.Equal(oracle.Metrics.InScopeAccuracy.Count, result.Metrics.InScopeAccuracy.Count);
            Assert.Equal(oracle.Rule.Margin, result.Margin);
            Assert.Contains(result.Margin, new[] { 0f, 0.03f, 0.07f });
        }, iter: 150);
    }

    // Hand-worked suite: in-scope probes of hall-light at 0.9, 0.8, 0.7, one in-scope probe whose best task is wrong
    // at 0.6, out-of-scope probes at 0.75, 0.65, 0.5; no runner-ups, so every margin splits alike.
    private static ScoredProbe[] HandSuite() =>
    [
        InScope("hall-light", "hall-light", 0.9f), InScope("hall-light", "hall-light", 0.8f), InScope("hall-light", "hall-light", 0.7f),
        InScope("hall-light", "keys-hook", 0.6f),
        OutOfScope("hall-light", 0.75f), OutOfScope("keys-hook", 0.65f), OutOfScope("water-basil", 0.5f),
    ];

    [Theory]
    // No false accept allowed: the threshold must sit above 0.75, so only 0.9 and 0.8 pass: 2/4. The midpoint of
    // (0.75, 0.8] is 0.775, written as 0.78. Margins all split alike, so the largest grid margin wins the tie.
    [InlineData(0.0, null, 0.78f, 2)]
    // One false accept in three allowed: down to (0.65, 0.7], midpoint 0.675 written 0.68: 3/4, FA 1/3.
    [InlineData(0.34, null, 0.68f, 3)]
    // Everything allowed: accepting 0.6 as well adds only a wrong-task accept, so the stricter 0.68 still wins the tie.
    [InlineData(1.0, null, 0.68f, 3)]
    [InlineData(1.0, 0.0, 0.68f, 3)]
    public void TuneForBudgets_HandWorkedSuite_ChoosesExpectedThreshold(double maxFa, double? maxWrong, float accept, int correct)
    {
        var result = GlobalOnly.TuneForBudgets(HandSuite(), new TuningBudgets(maxFa, maxWrong));
        Assert.True(result.Feasible);
        Assert.Equal(accept, result.Accept);
        Assert.Equal(0.10f, result.Margin);
        Assert.Equal(correct, result.Metrics.InScopeAccuracy.Count);
        Assert.Equal(4, result.Metrics.InScopeAccuracy.Total);
    }

    [Fact]
    public void TuneForBudgets_GapsInSuite_ChoosesLargestMarginThatKeepsAccuracy()
    {
        // Two in-scope probes with runner-up gaps 0.05 and 0.02. Accepting both needs margin ≤ 0.02; the largest
        // margin doing so is exactly 0.02 (gap 0.02 is not below 0.02), so 0.02 is expected.
        ScoredProbe[] probes =
        [
            InScope("hall-light", "hall-light", 0.90f, "keys-hook", 0.85f),
            InScope("keys-hook", "keys-hook", 0.80f, "hall-light", 0.78f),
            OutOfScope("water-basil", 0.40f),
        ];
        var result = GlobalOnly.TuneForBudgets(probes, new TuningBudgets(0));
        Assert.Equal(2, result.Metrics.InScopeAccuracy.Count);
        Assert.True(result.Margin <= 0.80f - 0.78f && result.Margin > 0.015f, $"margin {result.Margin}");
    }

    [Fact]
    public void TuneForBudgets_OutOfScopeExactMatch_IsInfeasibleWithSmallestViolation()
    {
        // One of two out-of-scope probes is an approved phrase: accepted at any threshold, so FA ≥ 1/2.
        ScoredProbe[] probes =
        [
            InScope("hall-light", "hall-light", 0.9f),
            OutOfScope("hall-light", 1f, exact: true),
            OutOfScope("keys-hook", 0.5f),
        ];
        var result = GlobalOnly.TuneForBudgets(probes, new TuningBudgets(0.1));
        Assert.False(result.Feasible);
        Assert.Equal(0.5 - 0.1, result.Violation, 12);
        // Among the settings with that violation the in-scope probe at 0.9 can still be accepted (0.5 stays rejected):
        // the threshold lies in (0.5, 0.9], midpoint 0.7.
        Assert.Equal(1, result.Metrics.InScopeAccuracy.Count);
        Assert.Equal(0.7f, result.Accept);
        Assert.Equal(1, result.Metrics.FalseAcceptRate.Count);
        Assert.NotEmpty(result.Notes);
    }

    [Fact]
    public void TuneForBudgets_NoOutOfScopeProbes_ThrowsSayingWhatToAdd()
    {
        var ex = Assert.Throws<ArgumentException>(() => GlobalOnly.TuneForBudgets([InScope("hall-light", "hall-light", 0.9f)], new TuningBudgets(0.05)));
        Assert.Contains("no out-of-scope probes", ex.Message);
    }

    [Fact]
    public void TuneForBudgets_RunnerUpAboveBest_ThrowsNamingTheProbe()
    {
        var bad = InScope("hall-light", "hall-light", 0.7f, "keys-hook", 0.8f) with { Probe = new ProbeCase("press the light", "hall-light", Line: 7) };
        var ex = Assert.Throws<ArgumentException>(() => GlobalOnly.TuneForBudgets([bad, OutOfScope("keys-hook", 0.2f)], new TuningBudgets(0.05)));
        Assert.Contains("line 7", ex.Message);
        Assert.Contains("swapped", ex.Message);
    }

    [Theory]
    [InlineData(-0.1)]
    [InlineData(1.5)]
    [InlineData(double.NaN)]
    public void TuningBudgets_OutOfRange_Throws(double budget)
        => Assert.Throws<ArgumentOutOfRangeException>(() => new TuningBudgets(budget));

    [Fact]
    public void TuneForBudgets_TradeOffCurve_IsMonotoneAndRespectsCaps()
    {
        Gen.Select(Suite, Budgets).Sample((probes, budgets) =>
        {
            var result = GlobalOnly.TuneForBudgets(probes, budgets);
            double previous = -1;
            foreach (var point in result.TradeOff)
            {
                if (!point.Feasible) continue;
                Assert.True(point.InScopeAccuracy >= previous, "a looser wrong-task cap cannot lower the best accuracy");
                previous = point.InScopeAccuracy;
                Assert.True(point.WrongTaskRate <= point.MaxWrongTask);
                // Each point is reproducible with the decision rule.
                var m = TuningMetrics.Evaluate(probes, new DecisionRule(point.Accept!.Value, point.Margin!.Value));
                Assert.Equal(point.InScopeAccuracy, m.InScopeAccuracy.Value, 12);
                Assert.True(m.FalseAcceptRate.Value <= budgets.MaxFalseAccept);
                // And it is the best the oracle finds under that cap.
                var oracle = TuningOracle.Best(probes, new TuningBudgets(budgets.MaxFalseAccept, point.MaxWrongTask), TuningOptions.Default.MarginGrid);
                Assert.Equal(oracle.Metrics.InScopeAccuracy.Value, point.InScopeAccuracy, 12);
            }
        }, iter: 15);
    }

    [Fact]
    public void TuneForBudgets_LargeSuite_FindsFeasibleSetting()
    {
        // 40 000 probes: an O(n²) search would need billions of steps; the sweep needs a few million.
        var random = new Random(12345); // System.Random with a seed is deterministic across runs in .NET.
        var probes = new ScoredProbe[40_000];
        for (int i = 0; i < probes.Length; i++)
        {
            float s = (float)random.NextDouble();
            float gap = (float)(random.NextDouble() * 0.2);
            probes[i] = i % 3 == 0
                ? OutOfScope(Tasks[i % 2], s, Tasks[2], Math.Max(0, s - gap))
                : InScope(Tasks[i % 3], Tasks[random.Next(3)], s, Tasks[(i + 1) % 3], Math.Max(0, s - gap));
        }
        // Runs to completion on a large suite (the search is O(n log n) per margin); speed is for the benchmarks, not timed here.
        var result = new ThresholdTuner().TuneForBudgets(probes, new TuningBudgets(0.02, 0.01));
        Assert.True(result.Feasible);
    }
}
