namespace TaskPhrase.Registry;

/// <summary>How serious a <see cref="RegistryDiagnostic"/> is.</summary>
public enum DiagnosticSeverity
{
    /// <summary>The registry is refused; nothing is loaded.</summary>
    Error = 0,

    /// <summary>The registry loads, but the author should look at this.</summary>
    Warning = 1,
}
