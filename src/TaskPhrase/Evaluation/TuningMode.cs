namespace TaskPhrase.Evaluation;

/// <summary>How a <see cref="TuningResult"/> was obtained.</summary>
public enum TuningMode
{
    /// <summary>Best in-scope accuracy under a false-accept budget (and optionally a wrong-task budget).</summary>
    Budget,

    /// <summary>Split-conformal accept threshold for a coverage target on in-scope probes.</summary>
    Coverage,
}
