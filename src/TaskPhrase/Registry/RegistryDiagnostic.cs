using System.Globalization;

namespace TaskPhrase.Registry;

/// <summary>
/// One problem found in a registry file, with its place in the file. Immutable.
/// </summary>
/// <param name="Severity">Error (the registry is refused) or warning.</param>
/// <param name="Code">Stable kebab-case code, one of <see cref="RegistryDiagnosticCodes"/> (e.g. <c>duplicate-phrase</c>).</param>
/// <param name="Message">What is wrong and what to do about it, in one sentence or two.</param>
/// <param name="Source">The file (or source name) the registry came from.</param>
/// <param name="Line">1-based line, or 0 when the problem concerns the whole file (e.g. its size).</param>
/// <param name="Column">1-based column (in characters), or 0 when the problem concerns the whole file.</param>
public sealed record RegistryDiagnostic(
    DiagnosticSeverity Severity, string Code, string Message, string Source, int Line, int Column)
{
    /// <summary>True when the diagnostic has a line and column.</summary>
    public bool HasLocation => Line > 0;

    /// <summary>
    /// Compiler-style text: <c>registry.yaml:12:7: error duplicate-phrase: message</c>
    /// (without <c>:line:column</c> when the diagnostic has no location).
    /// </summary>
    public override string ToString()
    {
        string severity = Severity == DiagnosticSeverity.Error ? "error" : "warning";
        return HasLocation
            ? string.Create(CultureInfo.InvariantCulture, $"{Source}:{Line}:{Column}: {severity} {Code}: {Message}")
            : $"{Source}: {severity} {Code}: {Message}";
    }
}
