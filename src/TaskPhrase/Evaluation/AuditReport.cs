using System.Globalization;

namespace TaskPhrase.Evaluation;

/// <summary>
/// The result of an audit: the metrics of the product design ("Audit metrics"), each rate with its count and 95 %
/// Wilson interval, plus the breakdowns, worst cases and curves a reviewer needs. Immutable and thread-safe; created by
/// <see cref="AuditEvaluator.Evaluate"/>.
/// </summary>
/// <remarks>
/// In-scope probes expect a task id, out-of-scope probes expect <c>reject</c>. Scores are the best-match score of each
/// resolution (<c>Resolution.Score</c>), −1 when it had none (e.g. empty input).
/// </remarks>
public sealed class AuditReport
{
    internal AuditReport() { }

    /// <summary>What was audited (suite, registry, model, thresholds, date).</summary>
    public required AuditContext Context { get; init; }

    /// <summary>Probe and outcome counts.</summary>
    public required AuditCounts Counts { get; init; }

    /// <summary><c>in_scope_accuracy</c>: in-scope probes accepted as the expected task / in-scope probes.</summary>
    public required RateEstimate InScopeAccuracy { get; init; }

    /// <summary><c>wrong_task_rate</c>: in-scope probes accepted as another task / in-scope probes (the dangerous error).</summary>
    public required RateEstimate WrongTaskRate { get; init; }

    /// <summary><c>false_reject_rate</c>: in-scope probes rejected or ambiguous / in-scope probes.</summary>
    public required RateEstimate FalseRejectRate { get; init; }

    /// <summary><c>false_accept_rate</c>: out-of-scope probes accepted as any task / out-of-scope probes.</summary>
    public required RateEstimate FalseAcceptRate { get; init; }

    /// <summary><c>oos_recall</c>: out-of-scope probes not accepted / out-of-scope probes (1 − false-accept rate).</summary>
    public required RateEstimate OosRecall { get; init; }

    /// <summary><c>ambiguity_rate</c>: probes with an ambiguous outcome / <em>all</em> probes (in-scope and out-of-scope).</summary>
    public required RateEstimate AmbiguityRate { get; init; }

    /// <summary><c>auroc</c> of the best-match score, in-scope probes as positives and out-of-scope as negatives; NaN when either is missing.</summary>
    public required double Auroc { get; init; }

    /// <summary><c>fpr_at_95_tpr</c>: the smallest false-positive rate of "accept when score ≥ t" with TPR ≥ 0.95 (<see cref="Statistics.FprAtTpr"/>); NaN when undefined.</summary>
    public required double FprAt95Tpr { get; init; }

    /// <summary>Per-task precision and recall: tasks of <see cref="AuditContext.TaskIds"/> in registry order, then any other task seen, by id.</summary>
    public required IReadOnlyList<TaskMetrics> PerTask { get; init; }

    /// <summary>Expected label × actual result counts.</summary>
    public required ConfusionTable Confusion { get; init; }

    /// <summary>Out-of-scope probes that were accepted, highest score first (at most <see cref="AuditContext.WorstCaseCount"/>).</summary>
    public required IReadOnlyList<AuditCase> WorstFalseAccepts { get; init; }

    /// <summary>In-scope probes accepted as another task, highest score first (at most <see cref="AuditContext.WorstCaseCount"/>).</summary>
    public required IReadOnlyList<AuditCase> WorstWrongTask { get; init; }

    /// <summary>In-scope probes rejected or ambiguous, lowest score first (at most <see cref="AuditContext.WorstCaseCount"/>).</summary>
    public required IReadOnlyList<AuditCase> WorstFalseRejects { get; init; }

    /// <summary>Every probe with its result, in suite order (all failures can be listed from here).</summary>
    public required IReadOnlyList<AuditCase> Cases { get; init; }

    /// <summary>Results by probe <c>kind</c>, in order of first appearance (probes without a kind last).</summary>
    public required IReadOnlyList<KindBreakdown> ByKind { get; init; }

    /// <summary>What each rejection reason caught, in vocabulary order (every reason present).</summary>
    public required IReadOnlyList<ReasonBreakdown> ByReason { get; init; }

    /// <summary>
    /// Approximate results over a range of global accept thresholds t (evenly spaced over the observed score range and
    /// the current threshold, which is always included). At t a probe counts as accepted when it <em>was</em> accepted
    /// and its score ≥ t, or when it was rejected only as <c>out_of_scope</c> and its score ≥ t (then as its best-scoring
    /// task). All other outcomes stay as they were. This ignores per-task thresholds and does not re-run the later guards
    /// (margin, look-alike, negation, hazard) for probes that would newly pass the threshold, so below the current
    /// threshold it is optimistic about acceptance. At the current threshold, without per-task overrides, it reproduces
    /// the observed accuracy and false-accept rate exactly.
    /// </summary>
    public required IReadOnlyList<SweepPoint> ThresholdSweep { get; init; }

    /// <summary>ROC curve of the best-match score (<see cref="Statistics.RocCurve"/>); empty when either side is missing.</summary>
    public required IReadOnlyList<RocPoint> Roc { get; init; }

    /// <summary>Best-match scores of in-scope probes, ascending (for histograms).</summary>
    public required IReadOnlyList<double> InScopeScores { get; init; }

    /// <summary>Best-match scores of out-of-scope probes, ascending (for histograms).</summary>
    public required IReadOnlyList<double> OutOfScopeScores { get; init; }

    /// <summary>
    /// Checks the report against <paramref name="budget"/>. A rate that the suite cannot measure (no in-scope or no
    /// out-of-scope probes) violates any budget on it: missing evidence never passes.
    /// </summary>
    /// <param name="budget">The limits.</param>
    /// <returns>The violations, in the order false-accept, wrong-task, accuracy; empty when every set limit is met.</returns>
    public IReadOnlyList<BudgetViolation> CheckBudgets(AuditBudget budget)
    {
        ArgumentNullException.ThrowIfNull(budget);
        var violations = new List<BudgetViolation>();
        if (budget.MaxFalseAccept is { } maxFa) CheckMax("false_accept_rate", FalseAcceptRate, maxFa, "out-of-scope", budget.UseConfidenceBound, violations);
        if (budget.MaxWrongTask is { } maxWt) CheckMax("wrong_task_rate", WrongTaskRate, maxWt, "in-scope", budget.UseConfidenceBound, violations);
        if (budget.MinAccuracy is { } minAcc)
        {
            double actual = budget.UseConfidenceBound ? InScopeAccuracy.CiLow : InScopeAccuracy.Value;
            string what = budget.UseConfidenceBound ? "the lower 95 % bound of in_scope_accuracy" : "in_scope_accuracy";
            if (InScopeAccuracy.Total == 0)
                violations.Add(new BudgetViolation("in_scope_accuracy", double.NaN, minAcc, $"in_scope_accuracy cannot be measured: the suite has no in-scope probes; add probes that expect a task."));
            else if (actual < minAcc)
                violations.Add(new BudgetViolation("in_scope_accuracy", actual, minAcc,
                    $"{what} is {Percent(actual)} ({InScopeAccuracy.Count}/{InScopeAccuracy.Total}), below the minimum {Percent(minAcc)}."));
        }
        return violations;
    }

    private static void CheckMax(string metric, RateEstimate rate, double limit, string side, bool bound, List<BudgetViolation> violations)
    {
        if (rate.Total == 0)
        {
            violations.Add(new BudgetViolation(metric, double.NaN, limit, $"{metric} cannot be measured: the suite has no {side} probes; add some."));
            return;
        }
        double actual = bound ? rate.CiHigh : rate.Value;
        if (actual > limit)
        {
            string what = bound ? $"the upper 95 % bound of {metric}" : metric;
            violations.Add(new BudgetViolation(metric, actual, limit, $"{what} is {Percent(actual)} ({rate.Count}/{rate.Total}), above the budget {Percent(limit)}."));
        }
    }

    internal static string Percent(double rate)
        => double.IsNaN(rate) ? "n/a" : (rate * 100).ToString("0.0#", CultureInfo.InvariantCulture) + " %";
}
