namespace TaskPhrase.Resolution.Scoring;

/// <summary>Which covariance of the approved phrase embeddings a <see cref="Whitening"/> is fitted to.</summary>
public enum CovarianceKind
{
    /// <summary>Within-task: each phrase minus its own task's mean (how wordings of one task scatter).</summary>
    WithinTask,

    /// <summary>Pooled: each phrase minus the mean of the task means (the whole registry's spread).</summary>
    Pooled,
}
