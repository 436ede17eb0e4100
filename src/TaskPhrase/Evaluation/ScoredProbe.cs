namespace TaskPhrase.Evaluation;

/// <summary>
/// One probe as the resolver saw it, reduced to what the decision thresholds act on: the best and
/// runner-up task with their scores, and whether a threshold-independent step already settled it.
/// A <see cref="DecisionRule"/> turns it into an outcome for any choice of thresholds, which is what
/// lets <see cref="ThresholdTuner"/> try many thresholds without resolving the suite again. Immutable.
/// </summary>
/// <param name="Probe">The probe suite row.</param>
/// <param name="BestTask">Id of the best-scoring task, or null when no task was scored (e.g. an empty utterance).</param>
/// <param name="BestScore">The best task's score (cosine-like); 1 for an exact match.</param>
/// <param name="RunnerUpTask">Id of the second-best task, or null when there was none to compare.</param>
/// <param name="RunnerUpScore">The runner-up task's score; ignored when <paramref name="RunnerUpTask"/> is null.</param>
/// <param name="GuardRejected">
/// True when a step that does not depend on the accept threshold or margin rejected the utterance:
/// <c>empty</c>, <c>unintelligible</c>, <c>negated</c>, <c>look_alike</c> or <c>hazard</c>.
/// </param>
/// <param name="ExactMatch">True when the utterance matched an approved phrase of <paramref name="BestTask"/> exactly.</param>
/// <param name="ExpectedTaskScore">
/// Optional score of the probe's expected task, for in-scope probes whose expected task is neither
/// best nor runner-up. Only coverage tuning uses it (see <see cref="ThresholdTuner.TuneForCoverage"/>);
/// when null the expected task's score is taken from the best or runner-up entry, else assumed to be −1.
/// </param>
public sealed record ScoredProbe(
    ProbeCase Probe,
    string? BestTask,
    float BestScore,
    string? RunnerUpTask,
    float RunnerUpScore,
    bool GuardRejected,
    bool ExactMatch,
    float? ExpectedTaskScore = null)
{
    /// <summary>
    /// The score of the probe's expected task as far as this record knows it: 1 for an exact match of the
    /// expected task, <see cref="ExpectedTaskScore"/> when given, the best or runner-up score when one of
    /// them is the expected task, and otherwise −1 (the lowest cosine similarity; a conservative stand-in).
    /// Null for out-of-scope probes.
    /// </summary>
    public float? ScoreOfExpected
    {
        get
        {
            if (!Probe.IsInScope) return null;
            if (ExactMatch && BestTask == Probe.Expect) return 1f;
            if (ExpectedTaskScore is { } given) return given;
            if (BestTask == Probe.Expect) return BestScore;
            if (RunnerUpTask is not null && RunnerUpTask == Probe.Expect) return RunnerUpScore;
            return -1f;
        }
    }

    /// <summary>
    /// Reduces a resolution of <paramref name="probe"/> to a scored probe: best and runner-up from its candidates,
    /// <see cref="Resolution.Resolution.Guard"/> as the threshold-independent verdict.
    /// </summary>
    /// <exception cref="ArgumentNullException">An argument is null.</exception>
    public static ScoredProbe From(ProbeCase probe, Resolution.Resolution resolution)
    {
        ArgumentNullException.ThrowIfNull(probe);
        ArgumentNullException.ThrowIfNull(resolution);
        var candidates = resolution.Candidates;
        string? best = resolution.Task?.Id ?? (candidates.Count > 0 ? candidates[0].TaskId : null);
        var runnerUp = candidates.Count > 1 ? candidates[1] : null;
        float? expected = probe.IsInScope ? candidates.FirstOrDefault(c => c.TaskId == probe.Expect)?.Score : null;
        return new ScoredProbe(probe, best, resolution.Score ?? -1f, runnerUp?.TaskId, runnerUp?.Score ?? -1f,
            resolution.Guard != Resolution.RejectionReason.None, resolution.ExactMatch, expected);
    }
}
