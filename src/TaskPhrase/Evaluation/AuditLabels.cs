using TaskPhrase.Resolution;

namespace TaskPhrase.Evaluation;

/// <summary>The snake_case names reports use for reasons and outcomes (as in the product vocabulary).</summary>
internal static class AuditLabels
{
    /// <summary>The reasons reports list, in vocabulary order (every reason except None).</summary>
    public static readonly RejectionReason[] Reasons =
    [
        RejectionReason.Empty, RejectionReason.Unintelligible, RejectionReason.OutOfScope, RejectionReason.Ambiguous,
        RejectionReason.LookAlike, RejectionReason.Negated, RejectionReason.Hazard,
    ];

    public static string Reason(RejectionReason reason) => reason switch
    {
        RejectionReason.None => "none",
        RejectionReason.Empty => "empty",
        RejectionReason.Unintelligible => "unintelligible",
        RejectionReason.OutOfScope => "out_of_scope",
        RejectionReason.Ambiguous => "ambiguous",
        RejectionReason.LookAlike => "look_alike",
        RejectionReason.Negated => "negated",
        RejectionReason.Hazard => "hazard",
        _ => throw new ArgumentOutOfRangeException(nameof(reason), reason, "Unknown rejection reason."),
    };

    public static string Outcome(ResolutionOutcome outcome) => outcome switch
    {
        ResolutionOutcome.Accepted => "accepted",
        ResolutionOutcome.Rejected => "rejected",
        ResolutionOutcome.Ambiguous => "ambiguous",
        _ => throw new ArgumentOutOfRangeException(nameof(outcome), outcome, "Unknown outcome."),
    };
}
