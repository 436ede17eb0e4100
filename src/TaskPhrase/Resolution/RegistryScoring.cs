using TaskPhrase.Registry;
using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Resolution;

/// <summary>The scoring parameters a registry's <c>scoring</c> mapping sets, applied to the learned-scorer settings.</summary>
internal static class RegistryScoring
{
    /// <summary>
    /// The whitening and head settings in force for <paramref name="registry"/>: when the strategy comes from the registry
    /// (<see cref="ResolverOptions.Scoring"/> is null), so do its parameters; an explicit strategy keeps
    /// <see cref="ResolverOptions.Learned"/> as given.
    /// </summary>
    public static LearnedScoringOptions LearnedFor(TaskRegistry registry, ResolverOptions options)
        => options.Scoring is null ? Apply(options.Learned, registry.Settings.ScoringParameters) : options.Learned;

    /// <summary>The settings a build uses for <paramref name="registry"/>: the defaults with its parameters applied.</summary>
    public static LearnedScoringOptions LearnedFor(TaskRegistry registry)
        => Apply(LearnedScoringOptions.Default, registry.Settings.ScoringParameters);

    /// <summary><paramref name="learned"/> with the set values of <paramref name="parameters"/> replacing its own.</summary>
    public static LearnedScoringOptions Apply(LearnedScoringOptions learned, ScoringParameters? parameters)
    {
        if (parameters is null || parameters.IsEmpty) return learned;
        var result = learned;
        if (parameters.Shrinkage is { } s) result = result with { Shrinkage = s };
        if (parameters.L2 is { } l2) result = result with { L2 = l2 };
        if (parameters.Temperature is { } t) result = result with { Temperature = t };
        if (parameters.ProbabilityWeight is { } w) result = result with { ProbabilityWeight = w };
        if (parameters.CentroidWeight is { } c) result = result with { BlendCentroidWeight = c };
        return result;
    }

    /// <summary>
    /// k of <see cref="ScoringStrategy.TopK"/> for <paramref name="registry"/>: the registry's <c>k</c> when the strategy
    /// comes from the registry and it gives one, else <see cref="ResolverOptions.TopK"/>.
    /// </summary>
    public static int TopKFor(TaskRegistry registry, ResolverOptions options)
        => options.Scoring is null && registry.Settings.ScoringParameters?.K is { } k ? k : options.TopK;
}
