namespace TaskPhrase.Registry;

/// <summary>The codes a <see cref="LintWarning"/> can carry. They are stable: tools may match on them.</summary>
public static class LintCodes
{
    /// <summary>The registry's thresholds were tuned for another model than the one it is checked with.</summary>
    public const string TunedForAnotherModel = "tuned-for-another-model";

    /// <summary>A phrase is as close as <see cref="LintOptions.CollisionSimilarity"/> or closer to a phrase of another task.</summary>
    public const string CrossTaskCollision = "cross-task-collision";

    /// <summary>A phrase is closer to another task's centroid than to the centroid of the rest of its own task.</summary>
    public const string CloserToOtherTask = "closer-to-other-task";

    /// <summary>Two phrases of one task are nearly the same (<see cref="LintOptions.NearDuplicateSimilarity"/>): redundant wording.</summary>
    public const string NearDuplicate = "near-duplicate";

    /// <summary>A task has fewer than <see cref="LintOptions.MinPhrases"/> phrases.</summary>
    public const string FewPhrases = "few-phrases";

    /// <summary>An approved phrase contains a negation word (don't, do not, never, no longer, not, stop, …).</summary>
    public const string NegationInPhrase = "negation-in-phrase";

    /// <summary>A phrase has fewer than <see cref="LintOptions.MinWords"/> words.</summary>
    public const string ShortPhrase = "short-phrase";

    /// <summary>A phrase has more than <see cref="LintOptions.MaxWords"/> words.</summary>
    public const string LongPhrase = "long-phrase";

    /// <summary>A phrase of a <c>confirm: true</c> task sits close to a phrase of a task without confirmation.</summary>
    public const string ConfirmNearNonConfirm = "confirm-near-non-confirm";
}
