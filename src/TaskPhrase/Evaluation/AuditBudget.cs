namespace TaskPhrase.Evaluation;

/// <summary>
/// Limits an audit must meet, e.g. "false-accept rate at most 1 %". Unset limits are not checked. Immutable; values
/// are validated on construction.
/// </summary>
public sealed record AuditBudget
{
    /// <summary>Creates a budget.</summary>
    /// <param name="maxFalseAccept">Highest allowed <c>false_accept_rate</c>, in [0, 1].</param>
    /// <param name="maxWrongTask">Highest allowed <c>wrong_task_rate</c>, in [0, 1].</param>
    /// <param name="minAccuracy">Lowest allowed <c>in_scope_accuracy</c>, in [0, 1].</param>
    /// <exception cref="ArgumentOutOfRangeException">A limit is outside [0, 1] or NaN.</exception>
    public AuditBudget(double? maxFalseAccept = null, double? maxWrongTask = null, double? minAccuracy = null)
    {
        MaxFalseAccept = Check(maxFalseAccept, nameof(maxFalseAccept));
        MaxWrongTask = Check(maxWrongTask, nameof(maxWrongTask));
        MinAccuracy = Check(minAccuracy, nameof(minAccuracy));
    }

    /// <summary>Highest allowed false-accept rate, or null.</summary>
    public double? MaxFalseAccept { get; }

    /// <summary>Highest allowed wrong-task rate, or null.</summary>
    public double? MaxWrongTask { get; }

    /// <summary>Lowest allowed in-scope accuracy, or null.</summary>
    public double? MinAccuracy { get; }

    /// <summary>
    /// When true the conservative end of the 95 % interval is compared instead of the point value: the upper bound for
    /// maximum budgets, the lower bound for the accuracy minimum. Use it for verification evidence, so that a small
    /// suite cannot pass by luck.
    /// </summary>
    public bool UseConfidenceBound { get; init; }

    /// <summary>True when no limit is set.</summary>
    public bool IsEmpty => MaxFalseAccept is null && MaxWrongTask is null && MinAccuracy is null;

    private static double? Check(double? value, string name)
    {
        if (value is { } v && !(v >= 0 && v <= 1))
            throw new ArgumentOutOfRangeException(name, v, "A budget is a rate in [0, 1], e.g. 0.01 for 1 %.");
        return value;
    }
}
