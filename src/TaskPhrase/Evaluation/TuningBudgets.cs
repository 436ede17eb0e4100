namespace TaskPhrase.Evaluation;

/// <summary>
/// The error budgets a budget-mode tuning must meet on the tuning suite. Immutable.
/// </summary>
public sealed record TuningBudgets
{
    /// <summary>Creates budgets.</summary>
    /// <param name="maxFalseAccept">Largest allowed false-accept rate (over out-of-scope probes), in [0, 1].</param>
    /// <param name="maxWrongTask">Largest allowed wrong-task rate (over in-scope probes), in [0, 1]; null for no cap.</param>
    /// <exception cref="ArgumentOutOfRangeException">A budget is outside [0, 1] or not a number.</exception>
    public TuningBudgets(double maxFalseAccept, double? maxWrongTask = null)
    {
        Check(maxFalseAccept, nameof(maxFalseAccept), "false-accept");
        if (maxWrongTask is { } w) Check(w, nameof(maxWrongTask), "wrong-task");
        MaxFalseAccept = maxFalseAccept;
        MaxWrongTask = maxWrongTask;
    }

    /// <summary>Largest allowed false-accept rate.</summary>
    public double MaxFalseAccept { get; }

    /// <summary>Largest allowed wrong-task rate, or null when not capped.</summary>
    public double? MaxWrongTask { get; }

    /// <summary>
    /// When true a rate is judged by the upper end of its 95 % Wilson score interval instead of its point value, so that
    /// a budget holds only when the suite is large enough to show it: with 50 out-of-scope probes and a 10 % budget no
    /// false accept is allowed (one of 50 has an upper bound of 10.5 %), with 150 up to 7. Default false. The same
    /// reading as <see cref="AuditBudget.UseConfidenceBound"/>. <see cref="ThresholdTuner"/> applies it to the suite-wide
    /// rates, and to the out-of-scope probes nearest a task before that task's accept threshold may be lowered by a
    /// per-task override (so lowering needs <see cref="ProbesNeededFor"/> such probes near the task); its other per-task
    /// checks read point rates.
    /// </summary>
    public bool UseConfidenceBound { get; init; }

    /// <summary>
    /// True when <paramref name="falseAccepts"/> of <paramref name="outOfScope"/> is within the false-accept budget (0 of 0 is;
    /// see <see cref="UseConfidenceBound"/>).
    /// </summary>
    public bool AllowsFalseAccepts(int falseAccepts, int outOfScope)
        => outOfScope == 0 ? falseAccepts == 0 : Judged(falseAccepts, outOfScope) <= MaxFalseAccept;

    /// <summary>
    /// True when <paramref name="wrongTask"/> of <paramref name="inScope"/> is within the wrong-task budget (always when
    /// uncapped; see <see cref="UseConfidenceBound"/>).
    /// </summary>
    public bool AllowsWrongTask(int wrongTask, int inScope)
        => MaxWrongTask is not { } cap || (inScope == 0 ? wrongTask == 0 : Judged(wrongTask, inScope) <= cap);

    /// <summary>
    /// How far the rates exceed the budgets: the sum of (rate − budget) over the budgets that are exceeded, each rate
    /// read as <see cref="UseConfidenceBound"/> says; 0 when both hold.
    /// </summary>
    public double Violation(int falseAccepts, int outOfScope, int wrongTask, int inScope)
    {
        double v = 0;
        if (outOfScope > 0) v += Math.Max(0, Judged(falseAccepts, outOfScope) - MaxFalseAccept);
        if (MaxWrongTask is { } cap && inScope > 0) v += Math.Max(0, Judged(wrongTask, inScope) - cap);
        return v;
    }

    /// <summary>
    /// With <see cref="UseConfidenceBound"/>: the fewest probes of one kind for which even a count of zero has an upper
    /// 95 % bound within <paramref name="budget"/> (z² (1 − b) / b, rounded up; the Wilson bound of 0 of n is z² / (n + z²));
    /// null for a budget of 0, or one so small (below about 4e-9) that the suite would need more than a billion probes.
    /// Without <see cref="UseConfidenceBound"/>, 1.
    /// </summary>
    public int? ProbesNeededFor(double budget)
    {
        if (!UseConfidenceBound) return 1;
        if (budget >= 1) return 1;
        if (budget <= 0) return null;
        double z2 = Statistics.Z95 * Statistics.Z95;
        double estimate = Math.Ceiling(z2 * (1 - budget) / budget);
        if (estimate > 1e9) return null;
        int n = (int)estimate;
        while (n > 1 && Statistics.WilsonInterval(0, n - 1).High <= budget) n--;
        while (Statistics.WilsonInterval(0, n).High > budget) n++;
        return n;
    }

    /// <summary>
    /// The smallest budget a suite with <paramref name="probes"/> probes of one kind can show by the upper end of the 95 %
    /// Wilson interval, reached only when none of them errs: z² / (n + z²) (1 for an empty suite). For example 0.0989 for
    /// 35 probes, 0.025 for 150.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="probes"/> is negative.</exception>
    public static double SmallestShowableBudget(int probes) => Statistics.WilsonInterval(0, probes).High;

    private double Judged(int count, int total)
        => UseConfidenceBound ? Statistics.WilsonInterval(count, total).High : (double)count / total;

    private static void Check(double value, string parameter, string what)
    {
        if (!(value >= 0 && value <= 1))
        {
            throw new ArgumentOutOfRangeException(parameter, value,
                $"The {what} budget must be a rate between 0 and 1 (e.g. 0.02 for 2 %); got {value}.");
        }
    }
}
