namespace TaskPhrase.Registry;

/// <summary>Optional resolver settings a registry can carry besides its thresholds. Immutable.</summary>
public sealed record RegistrySettings
{
    /// <summary>No overrides: built-in scoring and hazard lexicon.</summary>
    public static RegistrySettings Default { get; } = new();

    /// <summary>Scoring strategy name (<c>best-phrase</c>, <c>centroid</c>, <c>top-k</c>, <c>mahalanobis</c>), or null for the built-in default.</summary>
    public string? Scoring { get; init; }

    /// <summary>Extra hazard words, added to the built-in hazard lexicon.</summary>
    public IReadOnlyList<string> HazardWords { get; init; } = [];

    /// <summary>Built-in hazard words this registry allows (removed from the lexicon for it).</summary>
    public IReadOnlyList<string> AllowWords { get; init; } = [];

    /// <summary>Value equality: the scoring name and both word lists, item by item (ordinal).</summary>
    public bool Equals(RegistrySettings? other)
        => other is not null
            && Scoring == other.Scoring
            && HazardWords.SequenceEqual(other.HazardWords, StringComparer.Ordinal)
            && AllowWords.SequenceEqual(other.AllowWords, StringComparer.Ordinal);

    /// <summary>A hash code consistent with <see cref="Equals(RegistrySettings?)"/>.</summary>
    public override int GetHashCode() => HashCode.Combine(Scoring, HazardWords.Count, AllowWords.Count);
}
