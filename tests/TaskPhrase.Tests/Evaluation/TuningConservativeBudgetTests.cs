using CsCheck;
using TaskPhrase.Evaluation;
using static TaskPhrase.Tests.Evaluation.TuningTestData;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>
/// Budgets read by the upper end of the 95 % Wilson score interval (<see cref="TuningBudgets.UseConfidenceBound"/>,
/// <c>tune --conservative</c>). The bounds are recomputed here from Wilson's formula (E. B. Wilson, 1927, "Probable
/// inference, the law of succession, and statistical inference", JASA 22: (p̂ + z²/2n + z·√(p̂(1 − p̂)/n + z²/4n²)) /
/// (1 + z²/n)), not through the library's <see cref="Statistics.WilsonInterval"/>; its 0-of-n case reduces to z²/(n + z²).
/// </summary>
public class TuningConservativeBudgetTests
{
    private const double Z = 1.959964;

    private static double WilsonUpper(int k, int n)
    {
        if (k == n) return 1; // the formula gives 1 up to rounding here
        double p = (double)k / n, z2 = Z * Z;
        return (p + z2 / (2 * n) + Z * Math.Sqrt(p * (1 - p) / n + z2 / (4.0 * n * n))) / (1 + z2 / n);
    }

    [Theory]
    // 150 out-of-scope probes, 10 % budget: 7/150 has an upper bound of 0.0932, 8/150 of 0.1017.
    [InlineData(150, 0.10, 7)]
    // 50 probes: 0/50 → 0.0713, 1/50 → 0.1050, so no false accept at all.
    [InlineData(50, 0.10, 0)]
    // 1,500 in-scope probes, 5 % wrong-task budget: the largest k with an upper bound within 0.05.
    [InlineData(1500, 0.05, 58)]
    public void AllowsFalseAccepts_UpperBound_AllowsTheLargestCountWithinTheBudget(int n, double budget, int allowed)
    {
        Assert.True(WilsonUpper(allowed, n) <= budget, "the worked count itself must be within the budget");
        Assert.True(WilsonUpper(allowed + 1, n) > budget, "one more must not be");
        var b = new TuningBudgets(budget, budget) { UseConfidenceBound = true };
        Assert.True(b.AllowsFalseAccepts(allowed, n));
        Assert.False(b.AllowsFalseAccepts(allowed + 1, n));
        Assert.True(b.AllowsWrongTask(allowed, n));
        Assert.False(b.AllowsWrongTask(allowed + 1, n));
        // Point rates allow far more: budget × n.
        Assert.True(new TuningBudgets(budget, budget).AllowsFalseAccepts((int)Math.Floor(budget * n), n));
    }

    [Fact]
    public void Violation_UpperBound_IsTheBoundMinusTheBudget()
    {
        var b = new TuningBudgets(0.10, 0.05) { UseConfidenceBound = true };
        Assert.Equal(WilsonUpper(8, 150) - 0.10 + WilsonUpper(80, 1500) - 0.05, b.Violation(8, 150, 80, 1500), 6);
        Assert.True(WilsonUpper(80, 1500) > 0.05);
        Assert.Equal(0, b.Violation(7, 150, 58, 1500));
    }

    [Theory]
    // 0/n has the upper bound z²/(n + z²): within 0.10 from n = 35 (0.0989; 34 gives 0.1015), within 0.05 from 73.
    [InlineData(0.10, 35)]
    [InlineData(0.05, 73)]
    [InlineData(0.01, 381)]
    public void ProbesNeededFor_IsTheSmallestSuiteWhereZeroFits(double budget, int needed)
    {
        Assert.True(WilsonUpper(0, needed) <= budget);
        Assert.True(WilsonUpper(0, needed - 1) > budget);
        Assert.Equal(needed, new TuningBudgets(budget) { UseConfidenceBound = true }.ProbesNeededFor(budget));
        Assert.Equal(1, new TuningBudgets(budget).ProbesNeededFor(budget));
    }

    [Theory]
    // Newcombe (1998), "Two-sided confidence intervals for the single proportion", Stat. Med. 17, Table I: 0/20 → 0.1611.
    [InlineData(20, 0.1611)]
    [InlineData(35, 0.0989)]
    [InlineData(150, 0.0250)]
    public void SmallestShowableBudget_IsTheBoundOfZeroErrors(int n, double expected)
    {
        Assert.Equal(expected, TuningBudgets.SmallestShowableBudget(n), 4);
        Assert.Equal(WilsonUpper(0, n), TuningBudgets.SmallestShowableBudget(n), 12);
        Assert.Equal(1, TuningBudgets.SmallestShowableBudget(0));
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(1e-10)] // would need about 3.8e10 probes: more than any suite
    public void ProbesNeededFor_ZeroOrTinyBudget_IsNull(double budget)
        => Assert.Null(new TuningBudgets(budget) { UseConfidenceBound = true }.ProbesNeededFor(budget));

    [Fact]
    public void TuneForBudgets_Conservative_TradeOffCapsAreReadByTheBoundToo()
    {
        // 1,600 in-scope probes: 1,400 correct at 0.90, then 100 score levels from 0.80 down, each holding one correct
        // and one wrong-task probe, so every further level costs a wrong accept. A 5 % cap on point rates allows 80 wrong
        // accepts (80 levels); read by its upper bound it allows 62 (62/1600 → 0.0494, 63/1600 → 0.0501).
        var probes = new List<ScoredProbe>();
        for (int i = 0; i < 1400; i++) probes.Add(InScope("hall-light", "hall-light", 0.90f));
        for (int i = 0; i < 100; i++)
        {
            probes.Add(InScope("hall-light", "hall-light", 0.80f - i * 0.002f));
            probes.Add(InScope("hall-light", "keys-hook", 0.80f - i * 0.002f));
        }
        for (int i = 0; i < 100; i++) probes.Add(OutOfScope("water-basil", 0.20f));
        Assert.True(WilsonUpper(62, 1600) <= 0.05 && WilsonUpper(63, 1600) > 0.05);
        var tuner = new ThresholdTuner(new TuningOptions { AllowOverrides = false });
        var bound = tuner.TuneForBudgets(probes, new TuningBudgets(0.10) { UseConfidenceBound = true }).TradeOff.Single(t => t.MaxWrongTask == 0.05);
        var point = tuner.TuneForBudgets(probes, new TuningBudgets(0.10)).TradeOff.Single(t => t.MaxWrongTask == 0.05);
        Assert.True(bound.Feasible && point.Feasible);
        Assert.Equal(62, (int)Math.Round(bound.WrongTaskRate * 1600));
        Assert.Equal(80, (int)Math.Round(point.WrongTaskRate * 1600));
    }

    [Fact]
    public void TuneForBudgets_Conservative_MatchesBruteForceOracle()
    {
        var tuner = new ThresholdTuner(new TuningOptions { AllowOverrides = false });
        Gen.Select(Suite, Budgets).Sample((probes, point) =>
        {
            var budgets = point with { UseConfidenceBound = true };
            var result = tuner.TuneForBudgets(probes, budgets);
            var oracle = TuningOracle.Best(probes, budgets, TuningOptions.Default.MarginGrid, upper: WilsonUpper);
            Assert.Equal(oracle.Feasible, result.Feasible);
            Assert.Equal(oracle.Metrics.InScopeAccuracy.Count, result.Metrics.InScopeAccuracy.Count);
            Assert.Equal(oracle.Violation, result.Violation, 9);
            var rule = new DecisionRule(result.Accept, result.Margin);
            foreach (var p in probes) Assert.Equal(oracle.Rule.Apply(p), rule.Apply(p));
            if (result.Feasible)
            {
                Assert.True(WilsonUpper(result.Metrics.FalseAcceptRate.Count, result.Metrics.OutOfScope) <= budgets.MaxFalseAccept);
                if (budgets.MaxWrongTask is { } cap) Assert.True(WilsonUpper(result.Metrics.WrongTaskRate.Count, result.Metrics.InScope) <= cap);
            }
        }, iter: 200);
    }

    [Fact]
    public void TuneForBudgets_Conservative_ChoosesAStricterThresholdThanPointRates()
    {
        // 150 out-of-scope probes scoring 0.300, 0.304, …, 0.896 and 100
        // in-scope probes at 0.60 … 0.99. A 10 % point budget lets the 15 highest out-of-scope probes through, the
        // conservative one 7 (see the worked counts above).
        var probes = new List<ScoredProbe>();
        for (int i = 0; i < 150; i++) probes.Add(OutOfScope("hall-light", 0.30f + i * 0.004f));
        for (int i = 0; i < 100; i++) probes.Add(InScope("hall-light", "hall-light", 0.60f + i * 0.0039f));
        var tuner = new ThresholdTuner(new TuningOptions { AllowOverrides = false });
        var point = tuner.TuneForBudgets(probes, new TuningBudgets(0.10));
        var bound = tuner.TuneForBudgets(probes, new TuningBudgets(0.10) { UseConfidenceBound = true });
        Assert.Equal(15, point.Metrics.FalseAcceptRate.Count);
        Assert.Equal(7, bound.Metrics.FalseAcceptRate.Count);
        Assert.True(bound.Accept > point.Accept);
        Assert.True(bound.Feasible);
        Assert.Contains(bound.Notes, n => n.Contains("at most 7 false accepts of 150 out-of-scope probes"));
        // One allowed reads in the singular (126 probes, 5 %: 1/126 → 0.044, 2/126 → 0.056).
        var one = new List<ScoredProbe> { InScope("hall-light", "hall-light", 0.9f) };
        for (int i = 0; i < 126; i++) one.Add(OutOfScope("keys-hook", 0.2f + i * 0.001f));
        Assert.Contains(tuner.TuneForBudgets(one, new TuningBudgets(0.05) { UseConfidenceBound = true }).Notes,
            n => n.Contains("at most 1 false accept of 126 out-of-scope probes"));
    }

    [Fact]
    public void TuneForBudgets_Conservative_SuiteTooSmall_IsInfeasibleAndSaysHowManyProbesAreNeeded()
    {
        var probes = new List<ScoredProbe> { InScope("hall-light", "hall-light", 0.9f) };
        for (int i = 0; i < 20; i++) probes.Add(OutOfScope("keys-hook", 0.2f));
        var result = new ThresholdTuner().TuneForBudgets(probes, new TuningBudgets(0.10) { UseConfidenceBound = true });
        Assert.False(result.Feasible);
        Assert.Contains(result.Notes, n => n.Contains("with 20 out-of-scope probes even 0 false accepts") && n.Contains("at least 35 out-of-scope probes"));
        // The same suite meets the point budget.
        Assert.True(new ThresholdTuner().TuneForBudgets(probes, new TuningBudgets(0.10)).Feasible);
    }

    // hall-light: 12 in-scope probes at 0.70..0.81 with 3 out-of-scope neighbours at 0.65; keys-hook: 12 at 0.50..0.61
    // with `keysNeighbours` out-of-scope neighbours at 0.45. The global threshold must sit above 0.65: (0.65, 0.70],
    // written 0.68. Lowering keys-hook to (0.45, 0.50], written 0.48, accepts 0 of its neighbours.
    private static List<ScoredProbe> TwoTasks(int keysNeighbours)
    {
        var probes = new List<ScoredProbe>();
        for (int i = 0; i < 12; i++) probes.Add(InScope("hall-light", "hall-light", 0.70f + i * 0.01f));
        for (int i = 0; i < 12; i++) probes.Add(InScope("keys-hook", "keys-hook", 0.50f + i * 0.01f));
        for (int i = 0; i < 3; i++) probes.Add(OutOfScope("hall-light", 0.65f));
        for (int i = 0; i < keysNeighbours; i++) probes.Add(OutOfScope("keys-hook", 0.45f));
        return probes;
    }

    [Fact]
    public void TuneForBudgets_Conservative_LoweringATaskNeedsOutOfScopeEvidenceNearIt()
    {
        var tuner = new ThresholdTuner(new TuningOptions { MaxOverrideShift = 0.25f });
        // Three neighbours: 0 of 3 has an upper bound of 0.56, which cannot show a 40 % budget, so no lowering (the six
        // out-of-scope probes suite-wide allow 0: 0 of 6 → 0.39, 1 of 6 → 0.56); with point rates the same budget
        // gives the override (0 of 3 is 0 %).
        Assert.True(WilsonUpper(0, 3) > 0.40 && WilsonUpper(0, 6) <= 0.40 && WilsonUpper(1, 6) > 0.40);
        var few = TwoTasks(3);
        var fewBound = tuner.TuneForBudgets(few, new TuningBudgets(0.40) { UseConfidenceBound = true });
        Assert.True(fewBound.Feasible);
        Assert.Empty(fewBound.AcceptOverrides);
        Assert.Equal(new Dictionary<string, float> { ["keys-hook"] = 0.48f }, tuner.TuneForBudgets(few, new TuningBudgets(0.40)).AcceptOverrides);
        // No neighbour at all shows nothing either (0 of 0 meets any rate). 60 out-of-scope probes nearest a third task
        // keep the suite-wide bound within 10 % (0 of 63 → 0.057); point rates lower keys-hook (to the shift's limit).
        var none = TwoTasks(0);
        for (int i = 0; i < 60; i++) none.Add(OutOfScope("water-basil", 0.30f));
        Assert.True(WilsonUpper(0, 63) <= 0.10);
        var noneBound = tuner.TuneForBudgets(none, new TuningBudgets(0.10) { UseConfidenceBound = true });
        Assert.True(noneBound.Feasible);
        Assert.Empty(noneBound.AcceptOverrides);
        Assert.True(tuner.TuneForBudgets(none, new TuningBudgets(0)).AcceptOverrides["keys-hook"] < 0.50f);
        // Forty neighbours: 0 of 40 → 0.088 and 0 of 43 suite-wide → 0.082 are within 10 % (1 of 43 → 0.12 is not).
        Assert.True(WilsonUpper(0, 40) <= 0.10 && WilsonUpper(0, 43) <= 0.10 && WilsonUpper(1, 43) > 0.10);
        var result = tuner.TuneForBudgets(TwoTasks(40), new TuningBudgets(0.10) { UseConfidenceBound = true });
        Assert.True(result.Feasible);
        Assert.Equal(0.68f, result.Accept);
        Assert.Equal(new Dictionary<string, float> { ["keys-hook"] = 0.48f }, result.AcceptOverrides);
        Assert.Equal(24, result.Metrics.InScopeAccuracy.Count);
        Assert.Equal(0, result.Metrics.FalseAcceptRate.Count);
    }

    [Fact]
    public void TuneForBudgets_Conservative_PerTaskWrongTaskCheckStaysOnPointRates()
    {
        // keys-hook's 12 in-scope probes cannot show a 5 % wrong-task bound (0 of 12 → 0.24), yet lowering it is allowed
        // when its out-of-scope neighbours show the false-accept bound: the wrong-task bound is kept suite-wide only.
        var probes = TwoTasks(40);
        for (int i = 0; i < 60; i++) probes.Add(InScope("water-basil", "water-basil", 0.90f));
        Assert.True(WilsonUpper(0, 12) > 0.05 && WilsonUpper(0, 84) <= 0.05);
        var result = new ThresholdTuner(new TuningOptions { MaxOverrideShift = 0.25f })
            .TuneForBudgets(probes, new TuningBudgets(0.10, 0.05) { UseConfidenceBound = true });
        Assert.True(result.Feasible);
        Assert.Equal(new Dictionary<string, float> { ["keys-hook"] = 0.48f }, result.AcceptOverrides);
    }
}
