namespace TaskPhrase.Evaluation;

/// <summary>
/// A probe suite could not be read or is invalid. <see cref="Errors"/> lists every problem found (each bad row with
/// its line); the message lists them too, one per line (at most <see cref="MaxListedInMessage"/>).
/// </summary>
public sealed class ProbeSuiteException : Exception
{
    /// <summary>How many errors the message lists before summarising the rest.</summary>
    public const int MaxListedInMessage = 50;

    /// <summary>Creates the exception for one or more errors.</summary>
    /// <param name="errors">The problems found; at least one.</param>
    /// <param name="innerException">The underlying I/O or decoding exception, if any.</param>
    public ProbeSuiteException(IReadOnlyList<ProbeSuiteError> errors, Exception? innerException = null)
        : base(FormatMessage(errors), innerException)
    {
        Errors = errors;
    }

    /// <summary>Every problem found, in file order.</summary>
    public IReadOnlyList<ProbeSuiteError> Errors { get; }

    private static string FormatMessage(IReadOnlyList<ProbeSuiteError> errors)
    {
        ArgumentNullException.ThrowIfNull(errors);
        if (errors.Count == 0) throw new ArgumentException("At least one error is needed.", nameof(errors));
        if (errors.Count == 1) return errors[0].ToString();
        var lines = errors.Take(MaxListedInMessage).Select(e => e.ToString()).ToList();
        string head = $"{errors.Count} problems in probe suite {errors[0].Source}:";
        if (errors.Count > MaxListedInMessage) lines.Add($"... and {errors.Count - MaxListedInMessage} more (see Errors).");
        return head + Environment.NewLine + string.Join(Environment.NewLine, lines);
    }
}
