using TaskPhrase.Resolution;

namespace TaskPhrase.Evaluation;

/// <summary>What a <see cref="DecisionRule"/> decided for one <see cref="ScoredProbe"/>.</summary>
/// <param name="Outcome">Accepted, rejected or ambiguous.</param>
/// <param name="Task">The accepted task; for an ambiguous outcome the best task; null when rejected.</param>
public readonly record struct RuleDecision(ResolutionOutcome Outcome, string? Task)
{
    /// <summary>True when the probe was accepted as <paramref name="taskId"/>.</summary>
    public bool IsAcceptedAs(string taskId) => Outcome == ResolutionOutcome.Accepted && Task == taskId;

    /// <summary>True when the probe was accepted as any task.</summary>
    public bool IsAccepted => Outcome == ResolutionOutcome.Accepted;
}
