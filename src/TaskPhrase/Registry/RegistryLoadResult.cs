namespace TaskPhrase.Registry;

/// <summary>The outcome of <see cref="RegistryLoader.TryLoad"/> or <see cref="RegistryLoader.TryParse"/>. Immutable.</summary>
public sealed class RegistryLoadResult
{
    internal RegistryLoadResult(TaskRegistry? registry, IReadOnlyList<RegistryDiagnostic> diagnostics)
    {
        Registry = registry;
        Diagnostics = diagnostics;
    }

    /// <summary>The registry, or null when any error was found.</summary>
    public TaskRegistry? Registry { get; }

    /// <summary>Every diagnostic, errors and warnings, in the order found (file order within each pass).</summary>
    public IReadOnlyList<RegistryDiagnostic> Diagnostics { get; }

    /// <summary>True when the registry loaded (no errors; there may be warnings).</summary>
    public bool Succeeded => Registry is not null;

    /// <summary>The errors only.</summary>
    public IEnumerable<RegistryDiagnostic> Errors => Diagnostics.Where(d => d.Severity == DiagnosticSeverity.Error);

    /// <summary>The warnings only.</summary>
    public IEnumerable<RegistryDiagnostic> Warnings => Diagnostics.Where(d => d.Severity == DiagnosticSeverity.Warning);
}
