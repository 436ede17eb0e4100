namespace TaskPhrase.Evaluation;

/// <summary>
/// The outcome of a threshold tuning: the chosen thresholds, how they perform on the tuning suite, whether
/// they meet the budgets, and a trade-off curve for the report. Immutable.
/// </summary>
/// <remarks>
/// The figures are measured on the suite the thresholds were chosen on, so they are optimistic; confirm the
/// thresholds with an audit on a separate suite.
/// </remarks>
public sealed record TuningResult
{
    /// <summary>How the thresholds were chosen.</summary>
    public required TuningMode Mode { get; init; }

    /// <summary>The chosen rule: global accept threshold, margin and per-task accept overrides.</summary>
    public required DecisionRule Rule { get; init; }

    /// <summary>The chosen registry-wide accept threshold.</summary>
    public float Accept => Rule.Accept;

    /// <summary>The chosen registry-wide margin.</summary>
    public float Margin => Rule.Margin;

    /// <summary>Per-task accept overrides by task id (empty when none were justified).</summary>
    public IReadOnlyDictionary<string, float> AcceptOverrides => Rule.AcceptOverrides;

    /// <summary>The rates <see cref="Rule"/> achieves on the tuning suite (computed with <see cref="DecisionRule.Apply"/>).</summary>
    public required TuningMetrics Metrics { get; init; }

    /// <summary>
    /// Budget mode: true when the budgets are met. Coverage mode: true when the suite has enough in-scope
    /// probes for the finite-sample quantile to exist. When false, <see cref="Rule"/> is the best the search
    /// could do (the smallest budget violation) and the command line exits with code 1.
    /// </summary>
    public required bool Feasible { get; init; }

    /// <summary>Budget mode: how far the rates exceed the budgets (sum of excess rates); 0 when feasible.</summary>
    public double Violation { get; init; }

    /// <summary>The budgets of a budget-mode tuning; null in coverage mode.</summary>
    public TuningBudgets? Budgets { get; init; }

    /// <summary>The coverage target R of a coverage-mode tuning; null in budget mode.</summary>
    public double? CoverageTarget { get; init; }

    /// <summary>Coverage mode: the conformal quantile q̂ of the non-conformity scores (1 − expected-task score); null otherwise or when it does not exist.</summary>
    public double? ConformalQuantile { get; init; }

    /// <summary>Coverage mode: the share of in-scope probes whose expected-task score reaches the chosen accept threshold.</summary>
    public double? AchievedCoverage { get; init; }

    /// <summary>Budget mode: the best in-scope accuracy for a range of wrong-task caps (single threshold and margin); empty in coverage mode.</summary>
    public IReadOnlyList<TradeOffPoint> TradeOff { get; init; } = [];

    /// <summary>Human-readable remarks on the search (overrides considered or skipped, quantile details).</summary>
    public IReadOnlyList<string> Notes { get; init; } = [];

    /// <summary>
    /// The scoring setting the thresholds were chosen for, when <see cref="ScoringSearch"/> chose it (the tuned registry
    /// then carries it as its <c>scoring</c> key); null when the registry's own scoring was kept.
    /// </summary>
    public ScoringCandidate? Scoring { get; init; }

    /// <summary>
    /// Id of the embedding model the probes were scored with, when known: the tuned registry's <c>model</c> key (the
    /// model its thresholds were tuned for) is set to it. Null leaves that key as it was.
    /// </summary>
    public string? ModelId { get; init; }

    /// <summary>Number of scored probes the tuning used.</summary>
    public required int ProbeCount { get; init; }
}
