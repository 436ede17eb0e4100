namespace TaskPhrase.Resolution;

/// <summary>Why a resolution was not accepted. <see cref="None"/> for accepted resolutions.</summary>
public enum RejectionReason
{
    /// <summary>Accepted: no reason.</summary>
    None,

    /// <summary>Nothing left after normalisation.</summary>
    Empty,

    /// <summary>The text does not look like language the model knows (too many unknown or fragmented word pieces).</summary>
    Unintelligible,

    /// <summary>The best task scored below its accept threshold.</summary>
    OutOfScope,

    /// <summary>The runner-up task scored within the margin of the best.</summary>
    Ambiguous,

    /// <summary>The utterance is closer to one of the task's <c>must_reject</c> look-alikes than to its approved phrases.</summary>
    LookAlike,

    /// <summary>The utterance carries a negation that the matched approved phrases lack.</summary>
    Negated,

    /// <summary>The utterance contains a harmful action word that the matched task's vocabulary does not cover.</summary>
    Hazard,
}
