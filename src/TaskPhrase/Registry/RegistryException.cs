namespace TaskPhrase.Registry;

/// <summary>
/// Thrown when a registry is refused. Carries every error found (not just the first) and any warnings.
/// </summary>
public sealed class RegistryException : Exception
{
    /// <summary>Creates the exception from the diagnostics of a failed load; at least one must be an error.</summary>
    /// <exception cref="ArgumentException"><paramref name="diagnostics"/> holds no error.</exception>
    public RegistryException(IReadOnlyList<RegistryDiagnostic> diagnostics)
        : base(BuildMessage(diagnostics))
    {
        Diagnostics = diagnostics;
    }

    /// <summary>All diagnostics of the failed load, errors and warnings, in file order.</summary>
    public IReadOnlyList<RegistryDiagnostic> Diagnostics { get; }

    /// <summary>The errors only.</summary>
    public IEnumerable<RegistryDiagnostic> Errors => Diagnostics.Where(d => d.Severity == DiagnosticSeverity.Error);

    private static string BuildMessage(IReadOnlyList<RegistryDiagnostic> diagnostics)
    {
        ArgumentNullException.ThrowIfNull(diagnostics);
        var errors = diagnostics.Where(d => d.Severity == DiagnosticSeverity.Error).ToList();
        if (errors.Count == 0)
            throw new ArgumentException("A RegistryException needs at least one error diagnostic.", nameof(diagnostics));
        string head = errors.Count == 1
            ? $"The registry {errors[0].Source} was refused: 1 error."
            : $"The registry {errors[0].Source} was refused: {errors.Count} errors.";
        return head + Environment.NewLine + string.Join(Environment.NewLine, errors);
    }
}
