using TaskPhrase.Conditioning;
using TaskPhrase.Registry;

namespace TaskPhrase.Resolution;

/// <summary>
/// The result of resolving one utterance: the outcome, the task (when accepted), the evidence
/// (matched phrase, score, margin, candidates) and why it was not accepted. Immutable.
/// </summary>
public sealed record Resolution
{
    /// <summary>The utterance as given.</summary>
    public required string Utterance { get; init; }

    /// <summary>The utterance after normalisation (NFKC, control characters removed, white space collapsed).</summary>
    public required string Normalized { get; init; }

    /// <summary>Accepted, rejected or ambiguous.</summary>
    public required ResolutionOutcome Outcome { get; init; }

    /// <summary>Why it was not accepted; <see cref="RejectionReason.None"/> when accepted.</summary>
    public RejectionReason Reason { get; init; }

    /// <summary>A one-line human explanation of the decision (e.g. which word fired a guard).</summary>
    public string? Detail { get; init; }

    /// <summary>
    /// The selected task when accepted; for rejected and ambiguous outcomes the best-scoring task, so an app
    /// can show what was nearly chosen. Check <see cref="Outcome"/> before acting on it.
    /// </summary>
    public TaskDefinition? Task { get; init; }

    /// <summary>The approved phrase of <see cref="Task"/> nearest to the utterance.</summary>
    public string? Phrase { get; init; }

    /// <summary>The best task's score (cosine-like), when any task was scored; 1 for an exact match.</summary>
    public float? Score { get; init; }

    /// <summary>Best task's score minus the runner-up task's score, when there were two tasks to compare.</summary>
    public float? Margin { get; init; }

    /// <summary>True when the task must be confirmed by the user before the arm moves.</summary>
    public bool Confirm => Outcome == ResolutionOutcome.Accepted && Task is { Confirm: true };

    /// <summary>The top candidates, best first (for ambiguous outcomes the two tied tasks come first).</summary>
    public IReadOnlyList<TaskCandidate> Candidates { get; init; } = [];

    /// <summary>True when the utterance matched an approved phrase exactly (no model call was made).</summary>
    public bool ExactMatch { get; init; }

    /// <summary>True when the input was longer than the model's limit and was truncated before embedding.</summary>
    public bool Truncated { get; init; }

    /// <summary>Content words of the utterance that the matched task's vocabulary does not cover.</summary>
    public IReadOnlyList<string> UncoveredWords { get; init; } = [];

    /// <summary>
    /// Typing slips corrected toward the registry's vocabulary before embedding (e.g. <c>bazil → basil</c>); the
    /// corrected text is what was embedded and checked, while <see cref="Normalized"/> keeps the normalised input.
    /// </summary>
    public IReadOnlyList<string> Corrections { get; init; } = [];

    /// <summary>The hazard word that caused a <see cref="RejectionReason.Hazard"/> rejection, if any.</summary>
    public string? HazardWord { get; init; }

    /// <summary>
    /// The first threshold-independent guard that fires for this utterance (negated, hazard, look-alike,
    /// unintelligible, empty), even when the outcome was decided by a threshold; <see cref="RejectionReason.None"/> when none fires.
    /// Calibration uses it to replay decisions under other thresholds.
    /// </summary>
    public RejectionReason Guard { get; init; }

    /// <summary>The negation cue that caused a <see cref="RejectionReason.Negated"/> rejection, if any.</summary>
    public string? NegationCue { get; init; }

    /// <summary>FiLM conditioning of the matched approved phrase; present only on accepted resolutions when a generator is configured.</summary>
    public FilmConditioning? Conditioning { get; init; }

    /// <summary>SHA-256 content hash of the registry that made the decision.</summary>
    public required string RegistryHash { get; init; }

    /// <summary>Id of the embedding model.</summary>
    public required string ModelId { get; init; }

    /// <summary>Time taken by the resolve call.</summary>
    public TimeSpan Elapsed { get => _elapsed; init => _elapsed = value; }

    private TimeSpan _elapsed;

    /// <summary>
    /// Sets <see cref="Elapsed"/> on a resolution the resolver has just made and not yet handed out, instead of
    /// copying it with <c>with</c>: one allocation less per resolve. Never call it on a published instance.
    /// </summary>
    internal Resolution StampElapsed(TimeSpan elapsed)
    {
        _elapsed = elapsed;
        return this;
    }
}
