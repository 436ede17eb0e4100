using TaskPhrase.Resolution;

namespace TaskPhrase.Evaluation;

/// <summary>How many probes an audit ran and how they came out. Immutable.</summary>
public sealed record AuditCounts
{
    /// <summary>All probes.</summary>
    public required int Probes { get; init; }

    /// <summary>Probes whose <c>expect</c> is a task id.</summary>
    public required int InScope { get; init; }

    /// <summary>Probes whose <c>expect</c> is <c>reject</c>.</summary>
    public required int OutOfScope { get; init; }

    /// <summary>Probes resolved as accepted (any task).</summary>
    public required int Accepted { get; init; }

    /// <summary>Probes resolved as rejected.</summary>
    public required int Rejected { get; init; }

    /// <summary>Probes resolved as ambiguous.</summary>
    public required int Ambiguous { get; init; }

    /// <summary>Probes that matched an approved phrase exactly (no model call).</summary>
    public required int ExactMatches { get; init; }

    /// <summary>Probes whose input was truncated to the model's limit.</summary>
    public required int Truncated { get; init; }

    /// <summary>Not-accepted probes by reason; every reason except <see cref="RejectionReason.None"/> is present (zeros included).</summary>
    public required IReadOnlyDictionary<RejectionReason, int> ByReason { get; init; }
}
