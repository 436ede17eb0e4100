namespace TaskPhrase.Registry;

/// <summary>Collects the diagnostics of one load, all naming the same source.</summary>
internal sealed class DiagnosticBag(string source)
{
    private readonly List<RegistryDiagnostic> _items = [];

    public string Source { get; } = source;

    public bool HasErrors { get; private set; }

    public void Error(string code, SourcePosition at, string message)
    {
        HasErrors = true;
        _items.Add(new RegistryDiagnostic(DiagnosticSeverity.Error, code, message, Source, at.Line, at.Column));
    }

    public void Warning(string code, SourcePosition at, string message)
        => _items.Add(new RegistryDiagnostic(DiagnosticSeverity.Warning, code, message, Source, at.Line, at.Column));

    /// <summary>The diagnostics in file order (whole-file ones first); equal places keep the order found.</summary>
    public IReadOnlyList<RegistryDiagnostic> ToList()
        => _items.OrderBy(d => d.Line).ThenBy(d => d.Column).ToArray();
}
