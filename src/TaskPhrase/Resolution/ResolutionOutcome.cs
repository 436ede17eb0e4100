namespace TaskPhrase.Resolution;

/// <summary>The outcome of resolving one utterance.</summary>
public enum ResolutionOutcome
{
    /// <summary>A task was selected; the app may switch to its controller (after confirmation when the task says so).</summary>
    Accepted,

    /// <summary>No task was selected; <see cref="Resolution.Reason"/> says why.</summary>
    Rejected,

    /// <summary>Two tasks are too close to call; the app should ask the user which one was meant.</summary>
    Ambiguous,
}
