using System.Globalization;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;

namespace TaskPhrase.Evaluation;

/// <summary>
/// What an audit ran against and how it is presented: suite, registry and model identity, thresholds, date and report
/// options. Immutable; options are validated when set.
/// </summary>
public sealed record AuditContext
{
    private readonly int _worstCaseCount = 10;
    private readonly int _sweepSteps = 101;

    /// <summary>Name of the probe suite (e.g. its file name).</summary>
    public required string SuiteName { get; init; }

    /// <summary>Path of the probe suite file, if any.</summary>
    public string? SuitePath { get; init; }

    /// <summary>SHA-256 content hash of the registry; every resolution audited must carry the same hash.</summary>
    public required string RegistryHash { get; init; }

    /// <summary>Id of the embedding model; every resolution audited must carry the same id.</summary>
    public required string ModelId { get; init; }

    /// <summary>SHA-256 of the model file, if known.</summary>
    public string? ModelHash { get; init; }

    /// <summary>The registry-wide accept threshold in force.</summary>
    public required double AcceptThreshold { get; init; }

    /// <summary>The registry-wide margin in force.</summary>
    public required double Margin { get; init; }

    /// <summary>Per-task accept thresholds that differ from <see cref="AcceptThreshold"/>, by task id (shown in reports).</summary>
    public IReadOnlyDictionary<string, double> TaskAcceptThresholds { get; init; } = new Dictionary<string, double>();

    /// <summary>The registry's task ids in registry order; tasks listed here appear in per-task tables even without probes.</summary>
    public IReadOnlyList<string> TaskIds { get; init; } = [];

    /// <summary>When the audit ran (given by the caller, so that reports are reproducible).</summary>
    public required DateTimeOffset Date { get; init; }

    /// <summary>How many cases each worst-case list keeps (default 10, at least 0).</summary>
    public int WorstCaseCount
    {
        get => _worstCaseCount;
        init => _worstCaseCount = value >= 0 ? value : throw new ArgumentOutOfRangeException(nameof(WorstCaseCount), value, "WorstCaseCount must be 0 or more.");
    }

    /// <summary>Number of evenly spaced thresholds in the threshold sweep (default 101, between 2 and 10 000).</summary>
    public int SweepSteps
    {
        get => _sweepSteps;
        init => _sweepSteps = value is >= 2 and <= 10_000 ? value : throw new ArgumentOutOfRangeException(nameof(SweepSteps), value, "SweepSteps must be between 2 and 10000.");
    }

    /// <summary>
    /// The context of auditing <paramref name="suite"/> against <paramref name="registry"/> with <paramref name="model"/>:
    /// hashes, thresholds (registry defaults and per-task overrides) and task ids taken from them.
    /// </summary>
    /// <param name="registry">The registry the resolutions were made with.</param>
    /// <param name="model">The embedding model's identity.</param>
    /// <param name="suite">The probe suite.</param>
    /// <param name="date">When the audit ran.</param>
    public static AuditContext Create(TaskRegistry registry, EmbeddingModelInfo model, ProbeSuite suite, DateTimeOffset date)
    {
        ArgumentNullException.ThrowIfNull(registry);
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(suite);
        var overrides = new Dictionary<string, double>(StringComparer.Ordinal);
        foreach (var task in registry.Tasks)
        {
            if (task.Accept is { } accept && accept != registry.Defaults.Accept) overrides[task.Id] = Exact(accept);
        }
        return new AuditContext
        {
            SuiteName = Path.GetFileName(suite.SourceName),
            SuitePath = suite.SourceName,
            RegistryHash = registry.ContentHash,
            ModelId = model.Id,
            ModelHash = model.Sha256,
            AcceptThreshold = Exact(registry.Defaults.Accept),
            Margin = Exact(registry.Defaults.Margin),
            TaskAcceptThresholds = overrides,
            TaskIds = registry.Tasks.Select(t => t.Id).ToArray(),
            Date = date,
        };
    }

    /// <summary>A float as the double it was written as (0.6f → 0.6, not 0.60000002384185791).</summary>
    internal static double Exact(float value)
        => float.IsFinite(value) ? double.Parse(value.ToString("R", CultureInfo.InvariantCulture), CultureInfo.InvariantCulture) : value;
}
