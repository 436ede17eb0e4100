using CsCheck;
using TaskPhrase.Evaluation;
using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Evaluation;

// Every expected number below is counted by hand from the 12-row table in AuditScenario.
public class AuditEvaluatorTests
{
    private static readonly AuditReport Report = AuditScenario.Report();

    [Fact]
    public void Evaluate_Scenario_RatesFollowProductDefinitions()
    {
        // In-scope rows 1–6: accepted as expected 1, 2, 3; accepted as another task 4; rejected 5; ambiguous 6.
        AssertRate(Report.InScopeAccuracy, 3, 6);
        AssertRate(Report.WrongTaskRate, 1, 6);
        AssertRate(Report.FalseRejectRate, 2, 6);
        // Out-of-scope rows 7–12: only row 9 was accepted.
        AssertRate(Report.FalseAcceptRate, 1, 6);
        AssertRate(Report.OosRecall, 5, 6);
        // One ambiguous outcome (row 6) among all 12 probes.
        AssertRate(Report.AmbiguityRate, 1, 12);
    }

    [Fact]
    public void Evaluate_Scenario_RateIntervalsAreWilson95()
    {
        // Independent closed form of the Wilson score interval as given by Newcombe (1998), method 3.
        static (double, double) Newcombe(int r, int n)
        {
            const double z = 1.959964;
            double p = (double)r / n, root = z * Math.Sqrt(z * z + 4 * n * p * (1 - p));
            return ((2 * n * p + z * z - root) / (2 * (n + z * z)), (2 * n * p + z * z + root) / (2 * (n + z * z)));
        }
        var (low, high) = Newcombe(3, 6);
        Assert.Equal(low, Report.InScopeAccuracy.CiLow, 12);
        Assert.Equal(high, Report.InScopeAccuracy.CiHigh, 12);
        (low, high) = Newcombe(1, 12);
        Assert.Equal(low, Report.AmbiguityRate.CiLow, 12);
        Assert.Equal(high, Report.AmbiguityRate.CiHigh, 12);
    }

    [Fact]
    public void Evaluate_Scenario_CountsOutcomesAndReasons()
    {
        var c = Report.Counts;
        Assert.Equal((12, 6, 6), (c.Probes, c.InScope, c.OutOfScope));
        Assert.Equal((5, 6, 1), (c.Accepted, c.Rejected, c.Ambiguous));
        Assert.Equal(1, c.ExactMatches);
        Assert.Equal(3, c.ByReason[RejectionReason.OutOfScope]);   // rows 5, 7, 12
        Assert.Equal(1, c.ByReason[RejectionReason.Negated]);      // row 8
        Assert.Equal(1, c.ByReason[RejectionReason.Empty]);        // row 10
        Assert.Equal(1, c.ByReason[RejectionReason.Unintelligible]); // row 11
        Assert.Equal(1, c.ByReason[RejectionReason.Ambiguous]);    // row 6
        Assert.Equal(0, c.ByReason[RejectionReason.LookAlike]);
        Assert.Equal(0, c.ByReason[RejectionReason.Hazard]);
        Assert.False(c.ByReason.ContainsKey(RejectionReason.None));
    }

    [Fact]
    public void Evaluate_Scenario_AurocCountsPairsWithNoScoreAsMinusOne()
    {
        // Positives 1.0, 0.82, 0.74, 0.66, 0.55, 0.63; negatives 0.31, 0.86, 0.71, −1, −1, 0.58.
        // Pairs won: 6 + 5 + 5 + 4 + 3 + 4 = 27 of 36.
        Assert.Equal(27.0 / 36, Report.Auroc, 12);
        // TPR ≥ 0.95 needs all six positives (threshold 0.55); negatives ≥ 0.55 are 0.86, 0.71, 0.58 → 3/6.
        Assert.Equal(0.5, Report.FprAt95Tpr, 12);
        Assert.Equal([-1, -1, 0.31, 0.58, 0.71, 0.86], Report.OutOfScopeScores);
    }

    [Fact]
    public void Evaluate_Scenario_PerTaskPrecisionAndRecall()
    {
        Assert.Equal(AuditScenario.TaskIds, Report.PerTask.Select(t => t.TaskId)); // registry order, tasks without probes kept
        var byId = Report.PerTask.ToDictionary(t => t.TaskId);
        AssertRate(byId["water-basil"].Precision, 2, 2);
        AssertRate(byId["water-basil"].Recall, 2, 2);
        AssertRate(byId["remote-fetch"].Precision, 0, 1); // row 4 accepted as remote-fetch, expected phone-fetch
        AssertRate(byId["remote-fetch"].Recall, 0, 1);    // row 6 expected remote-fetch, ambiguous
        AssertRate(byId["phone-fetch"].Recall, 0, 1);
        Assert.Equal(0, byId["phone-fetch"].Predicted);
        Assert.True(double.IsNaN(byId["phone-fetch"].Precision.Value));
        AssertRate(byId["kettle-pour"].Precision, 0, 1);  // the false accept of row 9
        Assert.Equal(0, byId["kettle-pour"].Support);
        Assert.Equal(0, byId["fish-food"].Support + byId["fish-food"].Predicted);
    }

    [Fact]
    public void Evaluate_Scenario_ConfusionTable()
    {
        var t = Report.Confusion;
        Assert.Equal([.. AuditScenario.TaskIds, "reject"], t.ExpectedLabels);
        Assert.Equal([.. AuditScenario.TaskIds, "rejected", "ambiguous"], t.ActualLabels);
        Assert.Equal(2, t.Count("water-basil", "water-basil"));
        Assert.Equal(1, t.Count("phone-fetch", "remote-fetch"));
        Assert.Equal(1, t.Count("page-turn", "rejected"));
        Assert.Equal(1, t.Count("remote-fetch", "ambiguous"));
        Assert.Equal(5, t.Count("reject", "rejected"));
        Assert.Equal(1, t.Count("reject", "kettle-pour"));
        Assert.Equal(12, t.Cells.Sum(c => c.Count));
        Assert.Equal(7, t.Cells.Count);
    }

    [Fact]
    public void Evaluate_Scenario_WorstCasesOrderedByDanger()
    {
        var fa = Assert.Single(Report.WorstFalseAccepts);
        Assert.Equal(("kettle-pour", 0.71, 10), (fa.Got, fa.Score, fa.Line));
        var wt = Assert.Single(Report.WorstWrongTask);
        Assert.Equal(("phone-fetch", "remote-fetch"), (wt.Expected, wt.Got));
        Assert.Equal(["turn the paige", "pass me the thing"], Report.WorstFalseRejects.Select(c => c.Utterance)); // 0.55 before 0.63
        Assert.Equal(RejectionReason.Ambiguous, Report.WorstFalseRejects[1].Reason);
        Assert.Equal("page-turn", Report.WorstFalseRejects[0].Nearest);
    }

    [Fact]
    public void Evaluate_WorstCaseCountOne_KeepsOnlyTheWorst()
        => Assert.Equal("turn the paige", Assert.Single(AuditScenario.Report(worstCases: 1).WorstFalseRejects).Utterance);

    [Fact]
    public void Evaluate_Scenario_ByKindAndByReason()
    {
        Assert.Equal(["exact", "paraphrase", "asr-slip", "out-of-scope", "negated", "look-alike", "empty", "nonsense"], Report.ByKind.Select(k => k.Kind));
        var paraphrase = Report.ByKind[1];
        Assert.Equal((4, 0), (paraphrase.InScope, paraphrase.OutOfScope));
        AssertRate(paraphrase.Rate, 2, 4); // rows 2, 3 correct; 4 wrong task; 6 ambiguous
        AssertRate(Report.ByKind[3].Rate, 2, 2); // out-of-scope rows 7, 12 both refused
        AssertRate(Report.ByKind[5].Rate, 0, 1); // the look-alike was accepted

        var outOfScope = Report.ByReason.Single(r => r.Reason == RejectionReason.OutOfScope);
        Assert.Equal((2, 1), (outOfScope.OutOfScopeCaught, outOfScope.InScopeRefused));
        Assert.Equal((1, 0), Report.ByReason.Where(r => r.Reason == RejectionReason.Negated).Select(r => (r.OutOfScopeCaught, r.InScopeRefused)).Single());
        Assert.Equal((0, 1), Report.ByReason.Where(r => r.Reason == RejectionReason.Ambiguous).Select(r => (r.OutOfScopeCaught, r.InScopeRefused)).Single());
        Assert.Equal(7, Report.ByReason.Count);
    }

    [Fact]
    public void Evaluate_Scenario_SweepReproducesObservedRatesAtCurrentThreshold()
    {
        var at = Report.ThresholdSweep.Single(p => p.Threshold == 0.6);
        Assert.Equal(Report.InScopeAccuracy.Value, at.InScopeAccuracy, 12);
        Assert.Equal(Report.WrongTaskRate.Value, at.WrongTaskRate, 12);
        Assert.Equal(Report.FalseAcceptRate.Value, at.FalseAcceptRate, 12);
        Assert.Equal(0.31, Report.ThresholdSweep[0].Threshold, 12); // lowest observed score
        Assert.Equal(1.0, Report.ThresholdSweep[^1].Threshold, 12);
        Assert.Equal(12, Report.ThresholdSweep.Count); // 11 grid points plus the current threshold
    }

    [Theory]
    // t = 0.5: row 5 (out_of_scope, 0.55, best page-turn) becomes correct; row 12 (0.58) becomes a false accept.
    [InlineData(0.5, 4, 1, 2)]
    // t = 0.7: row 4 (0.66, wrong task) drops out; rows 1–3 and 9 stay.
    [InlineData(0.7, 3, 0, 1)]
    // t = 0.75: row 3 (0.74) and row 9 (0.71) drop out.
    [InlineData(0.75, 2, 0, 0)]
    public void Evaluate_SweepAtOtherThresholds_FollowsDocumentedApproximation(double threshold, int correct, int wrong, int falseAccepts)
    {
        var context = AuditScenario.Context() with { AcceptThreshold = threshold };
        var report = AuditEvaluator.Evaluate(AuditScenario.Probes, AuditScenario.Resolutions, context);
        var at = report.ThresholdSweep.Single(p => p.Threshold == threshold);
        Assert.Equal((correct, wrong, falseAccepts), (at.Correct, at.WrongTask, at.FalseAccepts));
    }

    [Fact]
    public void CheckBudgets_PointValues_ReportsOnlyExceededLimits()
    {
        var violations = Report.CheckBudgets(new AuditBudget(maxFalseAccept: 0.1, maxWrongTask: 0.2, minAccuracy: 0.4));

        var v = Assert.Single(violations);
        Assert.Equal("false_accept_rate", v.Metric);
        Assert.Equal(1.0 / 6, v.Actual, 12);
        Assert.Equal(0.1, v.Limit);
        Assert.Equal("false_accept_rate is 16.67 % (1/6), above the budget 10.0 %.", v.Message);
    }

    [Fact]
    public void CheckBudgets_ConfidenceBound_IsStricterForSmallSuites()
    {
        var budget = new AuditBudget(maxFalseAccept: 0.5, maxWrongTask: 0.2, minAccuracy: 0.4) { UseConfidenceBound = true };

        var violations = Report.CheckBudgets(budget);

        // Upper bound of 1/6 is ≈ 0.56 > 0.5 and > 0.2; lower bound of 3/6 is ≈ 0.19 < 0.4.
        Assert.Equal(["false_accept_rate", "wrong_task_rate", "in_scope_accuracy"], violations.Select(v => v.Metric));
        Assert.Equal(Report.FalseAcceptRate.CiHigh, violations[0].Actual);
        Assert.Equal(Report.InScopeAccuracy.CiLow, violations[2].Actual);
        Assert.StartsWith("the lower 95 % bound of in_scope_accuracy is 18.76 %", violations[2].Message);
    }

    [Fact]
    public void CheckBudgets_NoOutOfScopeProbes_FalseAcceptBudgetFails()
    {
        var report = AuditEvaluator.Evaluate(AuditScenario.Probes.Take(6).ToArray(), AuditScenario.Resolutions.Take(6).ToArray(), AuditScenario.Context());

        var v = Assert.Single(report.CheckBudgets(new AuditBudget(maxFalseAccept: 0.05)));
        Assert.True(double.IsNaN(v.Actual));
        Assert.Contains("no out-of-scope probes", v.Message);
        Assert.True(double.IsNaN(report.Auroc));
        Assert.Empty(report.Roc);
    }

    [Fact]
    public void CheckBudgets_EmptyBudget_NoViolations()
        => Assert.Empty(Report.CheckBudgets(new AuditBudget()));

    [Theory]
    [InlineData(-0.1)]
    [InlineData(1.1)]
    [InlineData(double.NaN)]
    public void AuditBudget_LimitOutOfRange_Throws(double limit)
        => Assert.Throws<ArgumentOutOfRangeException>(() => new AuditBudget(maxFalseAccept: limit));

    [Fact]
    public void Evaluate_CountMismatch_Throws()
    {
        var ex = Assert.Throws<ArgumentException>(() => AuditEvaluator.Evaluate(AuditScenario.Probes, AuditScenario.Resolutions.Take(3).ToArray(), AuditScenario.Context()));
        Assert.StartsWith("There are 12 probes but 3 resolutions", ex.Message);
    }

    [Fact]
    public void Evaluate_ResolutionsOutOfOrder_ThrowsNamingProbeLine()
    {
        var swapped = AuditScenario.Resolutions.ToArray();
        (swapped[0], swapped[1]) = (swapped[1], swapped[0]);
        var ex = Assert.Throws<ArgumentException>(() => AuditEvaluator.Evaluate(AuditScenario.Probes, swapped, AuditScenario.Context()));
        Assert.StartsWith("Resolution 0 is for 'give the basil a drink' but probe 0 (line 2) is 'water the basil'", ex.Message);
    }

    [Fact]
    public void Evaluate_ResolutionFromAnotherRegistry_Throws()
    {
        var mixed = AuditScenario.Resolutions.ToArray();
        mixed[2] = mixed[2] with { RegistryHash = "0000" };
        var ex = Assert.Throws<ArgumentException>(() => AuditEvaluator.Evaluate(AuditScenario.Probes, mixed, AuditScenario.Context()));
        Assert.StartsWith("Resolution 2 was made with registry 0000", ex.Message);
    }

    [Fact]
    public void Evaluate_AcceptedWithoutTask_Throws()
    {
        var broken = AuditScenario.Resolutions.ToArray();
        broken[0] = broken[0] with { Task = null };
        Assert.Contains("is accepted but names no task", Assert.Throws<ArgumentException>(() => AuditEvaluator.Evaluate(AuditScenario.Probes, broken, AuditScenario.Context())).Message);
    }

    [Fact]
    public void Evaluate_NoProbes_RatesAreUndefinedNotZero()
    {
        var report = AuditEvaluator.Evaluate([], [], AuditScenario.Context());
        Assert.True(double.IsNaN(report.InScopeAccuracy.Value));
        Assert.Equal((0.0, 1.0), (report.FalseAcceptRate.CiLow, report.FalseAcceptRate.CiHigh));
        Assert.Single(report.ThresholdSweep); // only the current threshold
    }

    [Fact]
    public void Evaluate_Property_RatesPartitionInScopeAndAgreeWithConfusionTable()
    {
        string[] tasks = ["water-basil", "kettle-pour", "blanket"];
        var row = Gen.Select(Gen.Int[0, 3], Gen.Int[0, 5], Gen.Int[0, 100],
            (expect, result, score) => (Expect: expect == 3 ? "reject" : tasks[expect], Result: result, Score: score / 100f));
        row.Array[0, 40].Sample(rows =>
        {
            var probes = rows.Select((r, i) => new ProbeCase($"u{i}", r.Expect, null, null, i + 2)).ToArray();
            var resolutions = rows.Select((r, i) => r.Result switch
            {
                < 3 => AuditScenario.Resolve($"u{i}", ResolutionOutcome.Accepted, tasks[r.Result], r.Score, RejectionReason.None),
                3 => AuditScenario.Resolve($"u{i}", ResolutionOutcome.Ambiguous, tasks[0], r.Score, RejectionReason.Ambiguous),
                4 => AuditScenario.Resolve($"u{i}", ResolutionOutcome.Rejected, tasks[1], r.Score, RejectionReason.OutOfScope),
                _ => AuditScenario.Resolve($"u{i}", ResolutionOutcome.Rejected, null, null, RejectionReason.Empty),
            }).ToArray();

            var report = AuditEvaluator.Evaluate(probes, resolutions, AuditScenario.Context());

            Assert.Equal(report.Counts.InScope, report.InScopeAccuracy.Count + report.WrongTaskRate.Count + report.FalseRejectRate.Count);
            Assert.Equal(report.Counts.OutOfScope, report.FalseAcceptRate.Count + report.OosRecall.Count);
            Assert.Equal(report.InScopeAccuracy.Count, tasks.Sum(t => report.Confusion.Count(t, t)));
            Assert.Equal(report.FalseAcceptRate.Count, tasks.Sum(t => report.Confusion.Count("reject", t)));
            Assert.Equal(report.Counts.Probes, report.Confusion.Cells.Sum(c => c.Count));
            Assert.Equal(report.Counts.Probes, report.ByKind.Sum(k => k.Probes));
            Assert.Equal(report.Counts.Rejected + report.Counts.Ambiguous, report.ByReason.Sum(r => r.Total));
            Assert.Equal(report.InScopeAccuracy.Count, report.PerTask.Sum(t => t.Recall.Count));
        }, iter: 200);
    }

    private static void AssertRate(RateEstimate rate, int count, int total)
    {
        Assert.Equal((count, total), (rate.Count, rate.Total));
        Assert.Equal((double)count / total, rate.Value, 12);
        Assert.InRange(rate.Value, rate.CiLow, rate.CiHigh);
    }
}
