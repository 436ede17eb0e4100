namespace TaskPhrase.Registry;

/// <summary>Optional resolver settings a registry can carry besides its thresholds. Immutable.</summary>
public sealed record RegistrySettings
{
    /// <summary>No overrides: built-in scoring and hazard lexicon.</summary>
    public static RegistrySettings Default { get; } = new();

    /// <summary>Scoring strategy name (<c>centroid</c>, <c>best-phrase</c>, <c>top-k</c>, <c>blend</c>, <c>whitened</c> — cosine after Mahalanobis-style whitening with a Ledoit–Wolf shrinkage covariance — or <c>head</c>, a learned softmax head), or null for the built-in default.</summary>
    public string? Scoring { get; init; }

    /// <summary>Parameters of <see cref="Scoring"/> (mapping form of the <c>scoring</c> key), or null for the built-in defaults.</summary>
    public ScoringParameters? ScoringParameters { get; init; }

    /// <summary>Extra hazard words, added to the built-in hazard lexicon.</summary>
    public IReadOnlyList<string> HazardWords { get; init; } = [];

    /// <summary>Built-in hazard words this registry allows (removed from the lexicon for it).</summary>
    public IReadOnlyList<string> AllowWords { get; init; } = [];

    /// <summary>Value equality: the scoring name and parameters and both word lists, item by item (ordinal).</summary>
    public bool Equals(RegistrySettings? other)
        => other is not null
            && Scoring == other.Scoring
            && Equals(ScoringParameters, other.ScoringParameters)
            && HazardWords.SequenceEqual(other.HazardWords, StringComparer.Ordinal)
            && AllowWords.SequenceEqual(other.AllowWords, StringComparer.Ordinal);

    /// <summary>A hash code consistent with <see cref="Equals(RegistrySettings?)"/>.</summary>
    public override int GetHashCode() => HashCode.Combine(Scoring, HazardWords.Count, AllowWords.Count);
}
