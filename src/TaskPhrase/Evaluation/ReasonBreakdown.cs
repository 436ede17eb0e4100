using TaskPhrase.Resolution;

namespace TaskPhrase.Evaluation;

/// <summary>What one rejection reason did in an audit: out-of-scope probes it caught and in-scope probes it refused. Immutable.</summary>
/// <param name="Reason">The reason (for <see cref="RejectionReason.Ambiguous"/>: ambiguous outcomes).</param>
/// <param name="OutOfScopeCaught">Out-of-scope probes not accepted for this reason (correct refusals).</param>
/// <param name="InScopeRefused">In-scope probes not accepted for this reason (false rejects).</param>
public sealed record ReasonBreakdown(RejectionReason Reason, int OutOfScopeCaught, int InScopeRefused)
{
    /// <summary>All probes not accepted for this reason.</summary>
    public int Total => OutOfScopeCaught + InScopeRefused;
}
