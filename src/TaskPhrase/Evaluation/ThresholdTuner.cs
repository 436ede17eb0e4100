namespace TaskPhrase.Evaluation;

/// <summary>
/// Chooses decision thresholds from a scored probe suite: either the best in-scope accuracy under a
/// false-accept budget (and optionally a wrong-task budget), or a split-conformal accept threshold for a
/// coverage target. Every candidate is judged exactly as <see cref="DecisionRule.Apply"/> would decide.
/// </summary>
/// <remarks>
/// Stateless apart from its options: thread-safe. The search sorts the probes once by best score and then
/// sweeps the accept thresholds for each margin in O(n), so a budget tuning costs O(n log n + M·n) for M margins.
/// </remarks>
public sealed partial class ThresholdTuner
{
    /// <summary>Creates a tuner with the given search settings.</summary>
    /// <param name="options">Search settings, or null for <see cref="TuningOptions.Default"/>.</param>
    public ThresholdTuner(TuningOptions? options = null) => Options = options ?? TuningOptions.Default;

    /// <summary>The search settings.</summary>
    public TuningOptions Options { get; }

    /// <summary>
    /// Budget mode: searches accept thresholds (between the sorted distinct best scores, plus just below the
    /// lowest and just above the highest) and margins (<see cref="TuningOptions.MarginGrid"/> plus, when enabled,
    /// values between the observed gaps) for the highest in-scope accuracy whose false-accept rate and
    /// wrong-task rate stay within <paramref name="budgets"/>. Ties go to the stricter setting: the higher
    /// accept threshold, then the larger margin. Then considers per-task accept overrides (see remarks).
    /// </summary>
    /// <remarks>
    /// <para>When no setting meets the budgets, the result is the setting with the smallest violation (ties: higher
    /// accuracy, then stricter) and <see cref="TuningResult.Feasible"/> is false. Since rejecting everything but
    /// exact matches is always a candidate, this happens only when exact matches alone break a budget, e.g. an
    /// out-of-scope probe that is an approved phrase.</para>
    /// <para>Per-task overrides, only where the data supports them: a task qualifies with at least
    /// <see cref="TuningOptions.MinProbesForOverride"/> in-scope probes expecting it. Its override may raise or lower
    /// the global threshold by at most <see cref="TuningOptions.MaxOverrideShift"/>, keeps the chosen margin, and must
    /// keep the budgets both suite-wide and on the probes nearest that task (false accepts among the out-of-scope
    /// probes whose best task it is; wrong-task accepts among the in-scope ones). Among all combinations the one with
    /// the most in-scope probes accepted as expected wins, then the one with fewer overrides; so an override is
    /// only added when it raises accuracy (a raise can free budget that lets another task be lowered). The
    /// combination is found exactly by dynamic programming over the remaining false-accept and wrong-task counts;
    /// when that table would be too large, no overrides are made and a note says so.</para>
    /// <para>With <see cref="TuningBudgets.UseConfidenceBound"/> the budgets are read by the upper ends of the rates'
    /// 95 % Wilson intervals, and notes say how many false accepts and wrong-task accepts that allows on this suite (or
    /// how many probes the suite would need).</para>
    /// </remarks>
    /// <param name="probes">The scored probes; needs at least one in-scope and one out-of-scope probe.</param>
    /// <param name="budgets">The budgets to meet.</param>
    /// <exception cref="ArgumentNullException">An argument is null.</exception>
    /// <exception cref="ArgumentException">A probe is malformed (non-finite scores, runner-up above best), or the suite lacks in-scope or out-of-scope probes.</exception>
    public TuningResult TuneForBudgets(IReadOnlyList<ScoredProbe> probes, TuningBudgets budgets)
    {
        ArgumentNullException.ThrowIfNull(probes);
        ArgumentNullException.ThrowIfNull(budgets);
        var prepared = Prepared.Create(probes);
        if (prepared.InScope == 0)
        {
            throw new ArgumentException("The tuning suite has no in-scope probes (rows whose expect is a task id), so accuracy cannot be measured; add in-scope probes.", nameof(probes));
        }
        if (prepared.OutOfScope == 0)
        {
            throw new ArgumentException("The tuning suite has no out-of-scope probes (rows whose expect is 'reject'), so a false-accept budget cannot be checked; " +
                "add out-of-scope probes (for example from 'taskphrase probes').", nameof(probes));
        }
        return SearchBudgets(probes, prepared, budgets);
    }

    /// <summary>
    /// Coverage mode (split conformal prediction): chooses the accept threshold so that, for a new exchangeable
    /// in-scope utterance, the expected task's score reaches it with probability at least <paramref name="coverage"/>.
    /// </summary>
    /// <remarks>
    /// Following Angelopoulos &amp; Bates (2021), "A Gentle Introduction to Conformal Prediction and Distribution-Free
    /// Uncertainty Quantification": with non-conformity s = 1 − (score of the expected task) over the n in-scope
    /// probes, q̂ is the ⌈(n+1)R⌉/n empirical quantile, i.e. the k-th smallest s with k = ⌈(n+1)R⌉, and the accept
    /// threshold is 1 − q̂, the k-th largest expected-task score (a value between it and the next lower score is
    /// written, which accepts the same probes and cannot lower coverage). When k &gt; n the quantile does not exist:
    /// the result accepts every score and is not feasible; the suite needs at least R/(1−R) in-scope probes.
    /// The guarantee covers the score only: guards and the margin can still refuse an utterance, so
    /// <see cref="TuningResult.Metrics"/> reports the actual acceptance. Out-of-scope probes do not enter the
    /// quantile; their false-accept rate is reported.
    /// </remarks>
    /// <param name="probes">The scored probes; needs at least one in-scope probe.</param>
    /// <param name="coverage">Target coverage R, strictly between 0 and 1 (e.g. 0.95).</param>
    /// <param name="margin">The margin to use with the chosen threshold (finite, ≥ 0); not tuned in this mode.</param>
    /// <exception cref="ArgumentNullException"><paramref name="probes"/> is null.</exception>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="coverage"/> or <paramref name="margin"/> is out of range.</exception>
    /// <exception cref="ArgumentException">A probe is malformed, or there are no in-scope probes.</exception>
    public TuningResult TuneForCoverage(IReadOnlyList<ScoredProbe> probes, double coverage, float margin)
    {
        ArgumentNullException.ThrowIfNull(probes);
        if (!(coverage > 0 && coverage < 1))
        {
            throw new ArgumentOutOfRangeException(nameof(coverage), coverage, $"The coverage target must lie strictly between 0 and 1 (e.g. 0.95); got {coverage}.");
        }
        if (!float.IsFinite(margin) || margin < 0)
        {
            throw new ArgumentOutOfRangeException(nameof(margin), margin, $"The margin must be a finite number of at least 0; got {margin}.");
        }
        Prepared.Validate(probes);
        return SearchCoverage(probes, coverage, margin);
    }
}
