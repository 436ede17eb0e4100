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
}
