using TaskPhrase.Resolution;

namespace TaskPhrase.Evaluation;

/// <summary>One probe and how it was resolved, as listed among an audit's worst cases. Immutable.</summary>
public sealed record AuditCase
{
    /// <summary>The probe's utterance as written in the suite (untrusted text: escape it before display).</summary>
    public required string Utterance { get; init; }

    /// <summary>The expected task id, or <c>reject</c>.</summary>
    public required string Expected { get; init; }

    /// <summary>What came out: the accepted task id, <c>rejected</c> or <c>ambiguous</c>.</summary>
    public required string Got { get; init; }

    /// <summary>The outcome.</summary>
    public required ResolutionOutcome Outcome { get; init; }

    /// <summary>The best-scoring task even when not accepted (what was nearly chosen), if any task was scored.</summary>
    public string? Nearest { get; init; }

    /// <summary>Best-match score; −1 when the resolution had none (e.g. empty input).</summary>
    public required double Score { get; init; }

    /// <summary>Why it was not accepted; <see cref="RejectionReason.None"/> when accepted.</summary>
    public required RejectionReason Reason { get; init; }

    /// <summary>The probe's kind label, if any.</summary>
    public string? Kind { get; init; }

    /// <summary>1-based line of the probe in its suite (0 when not read from a file).</summary>
    public required int Line { get; init; }
}
