namespace TaskPhrase.Evaluation;

/// <summary>
/// Counts of probes by expected label (rows: task ids, then <c>reject</c>) and actual result (columns: task ids, then
/// <c>rejected</c> and <c>ambiguous</c>). Immutable.
/// </summary>
public sealed class ConfusionTable
{
    /// <summary>The actual label of rejected probes.</summary>
    public const string Rejected = "rejected";

    /// <summary>The actual label of ambiguous probes.</summary>
    public const string Ambiguous = "ambiguous";

    private readonly Dictionary<(string, string), int> _counts;

    internal ConfusionTable(IReadOnlyList<string> expectedLabels, IReadOnlyList<string> actualLabels, Dictionary<(string, string), int> counts)
    {
        ExpectedLabels = expectedLabels;
        ActualLabels = actualLabels;
        _counts = counts;
        var cells = new List<ConfusionCell>();
        foreach (var e in expectedLabels)
            foreach (var a in actualLabels)
                if (counts.TryGetValue((e, a), out int n) && n > 0) cells.Add(new ConfusionCell(e, a, n));
        Cells = cells;
    }

    /// <summary>Row labels in display order: task ids, then <c>reject</c> when the suite has out-of-scope probes.</summary>
    public IReadOnlyList<string> ExpectedLabels { get; }

    /// <summary>Column labels in display order: task ids, then <c>rejected</c> and <c>ambiguous</c>.</summary>
    public IReadOnlyList<string> ActualLabels { get; }

    /// <summary>The non-zero cells, row by row in label order.</summary>
    public IReadOnlyList<ConfusionCell> Cells { get; }

    /// <summary>Number of probes expecting <paramref name="expected"/> that came out as <paramref name="actual"/> (0 for unknown labels).</summary>
    public int Count(string expected, string actual) => _counts.GetValueOrDefault((expected, actual));
}
