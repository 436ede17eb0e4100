namespace TaskPhrase.Evaluation;

/// <summary>
/// Results for the probes of one <c>kind</c>. A probe is <em>correct</em> when an in-scope probe was accepted as the
/// expected task, or an out-of-scope probe was not accepted. Immutable.
/// </summary>
/// <param name="Kind">The kind label; null for probes without one.</param>
/// <param name="InScope">In-scope probes of this kind.</param>
/// <param name="OutOfScope">Out-of-scope probes of this kind.</param>
/// <param name="Rate">Correct probes / all probes of this kind, with its interval.</param>
public sealed record KindBreakdown(string? Kind, int InScope, int OutOfScope, RateEstimate Rate)
{
    /// <summary>All probes of this kind.</summary>
    public int Probes => InScope + OutOfScope;

    /// <summary>Correct probes of this kind.</summary>
    public int Correct => Rate.Count;
}
