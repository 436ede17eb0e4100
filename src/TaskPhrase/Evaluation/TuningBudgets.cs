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

    /// <summary>True when <paramref name="falseAccepts"/> of <paramref name="outOfScope"/> is within the false-accept budget (0 of 0 is).</summary>
    public bool AllowsFalseAccepts(int falseAccepts, int outOfScope)
        => outOfScope == 0 ? falseAccepts == 0 : (double)falseAccepts / outOfScope <= MaxFalseAccept;

    /// <summary>True when <paramref name="wrongTask"/> of <paramref name="inScope"/> is within the wrong-task budget (always when uncapped).</summary>
    public bool AllowsWrongTask(int wrongTask, int inScope)
        => MaxWrongTask is not { } cap || (inScope == 0 ? wrongTask == 0 : (double)wrongTask / inScope <= cap);

    /// <summary>
    /// How far the rates exceed the budgets: the sum of (rate − budget) over the budgets that are exceeded; 0 when both hold.
    /// </summary>
    public double Violation(int falseAccepts, int outOfScope, int wrongTask, int inScope)
    {
        double v = 0;
        if (outOfScope > 0) v += Math.Max(0, (double)falseAccepts / outOfScope - MaxFalseAccept);
        if (MaxWrongTask is { } cap && inScope > 0) v += Math.Max(0, (double)wrongTask / inScope - cap);
        return v;
    }

    private static void Check(double value, string parameter, string what)
    {
        if (!(value >= 0 && value <= 1))
        {
            throw new ArgumentOutOfRangeException(parameter, value,
                $"The {what} budget must be a rate between 0 and 1 (e.g. 0.02 for 2 %); got {value}.");
        }
    }
}
