namespace TaskPhrase.Registry;

/// <summary>One task the arm can do, as approved in a registry. Immutable.</summary>
public sealed record TaskDefinition
{
    /// <summary>Kebab-case id, unique in the registry (e.g. <c>water-basil</c>).</summary>
    public required string Id { get; init; }

    /// <summary>Human-readable title.</summary>
    public required string Title { get; init; }

    /// <summary>True when the app must ask the user to confirm before moving (hazardous task).</summary>
    public bool Confirm { get; init; }

    /// <summary>Per-task accept threshold, or null to use the registry default.</summary>
    public float? Accept { get; init; }

    /// <summary>Per-task margin, or null to use the registry default.</summary>
    public float? Margin { get; init; }

    /// <summary>The downstream controller binding.</summary>
    public required ControllerBinding Controller { get; init; }

    /// <summary>Approved wordings, in registry order; at least one.</summary>
    public required IReadOnlyList<string> Phrases { get; init; }

    /// <summary>Look-alike wordings that must never resolve to this task (hard negatives).</summary>
    public IReadOnlyList<string> MustReject { get; init; } = [];

    /// <summary>Extra words (synonyms) that count as covered by this task's vocabulary in the lexical check.</summary>
    public IReadOnlyList<string> AlsoWords { get; init; } = [];

    /// <summary>Value equality: every member, with the lists compared item by item (ordinal).</summary>
    public bool Equals(TaskDefinition? other)
        => other is not null
            && Id == other.Id && Title == other.Title && Confirm == other.Confirm
            && Nullable.Equals(Accept, other.Accept) && Nullable.Equals(Margin, other.Margin)
            && Controller == other.Controller
            && Phrases.SequenceEqual(other.Phrases, StringComparer.Ordinal)
            && MustReject.SequenceEqual(other.MustReject, StringComparer.Ordinal)
            && AlsoWords.SequenceEqual(other.AlsoWords, StringComparer.Ordinal);

    /// <summary>A hash code consistent with <see cref="Equals(TaskDefinition?)"/>.</summary>
    public override int GetHashCode() => HashCode.Combine(Id, Title, Confirm, Accept, Margin, Controller, Phrases.Count);
}
