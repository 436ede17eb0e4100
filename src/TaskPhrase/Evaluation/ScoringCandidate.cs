using System.Globalization;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Evaluation;

/// <summary>
/// One scoring setting the strategy search of <see cref="ScoringSearch"/> tries: a registry strategy name and its
/// parameters, exactly as the tuned registry's <c>scoring</c> key will carry them. Immutable, value equality.
/// </summary>
/// <param name="Strategy">A registry strategy name: best-phrase, centroid, top-k, blend, whitened or head.</param>
/// <param name="Parameters">Its parameters, or null for the built-in defaults.</param>
public sealed record ScoringCandidate(string Strategy, ScoringParameters? Parameters = null)
{
    /// <summary>The registry strategy names, in the order the default search tries them.</summary>
    public static IReadOnlyList<string> StrategyNames { get; } = Array.AsReadOnly(new[] { "centroid", "best-phrase", "top-k", "blend", "whitened", "head" });

    /// <summary>Shrinkage values the default search tries for <c>whitened</c> (null: Ledoit–Wolf).</summary>
    public static IReadOnlyList<double?> DefaultShrinkages { get; } = Array.AsReadOnly(new double?[] { null, 0.25, 0.5, 0.75 });

    /// <summary>L2 penalties the default search tries for <c>head</c>.</summary>
    public static IReadOnlyList<double> DefaultL2 { get; } = Array.AsReadOnly(new[] { 0.001, 0.01, 0.1 });

    /// <summary>Softmax temperatures the default search tries for <c>head</c> (no retraining per temperature).</summary>
    public static IReadOnlyList<double> DefaultTemperatures { get; } = Array.AsReadOnly(new[] { 1.0, 2.0, 4.0 });

    /// <summary>Probability weights α the default search tries for <c>head</c> (score p^α · c^(1 − α); no retraining).</summary>
    public static IReadOnlyList<double> DefaultProbabilityWeights { get; } = Array.AsReadOnly(new[] { 0.25, 0.5, 0.75 });

    /// <summary>k values the default search tries for <c>top-k</c> (3 is the built-in default and is left implicit).</summary>
    public static IReadOnlyList<int> DefaultK { get; } = Array.AsReadOnly(new[] { 3, 2, 5 });

    /// <summary>Centroid weights the default search tries for <c>blend</c> (0.5 is the built-in default and is left implicit).</summary>
    public static IReadOnlyList<double> DefaultCentroidWeights { get; } = Array.AsReadOnly(new[] { 0.5, 0.25, 0.75 });

    /// <summary>Readable form, e.g. <c>head (l2 0.01, temperature 2)</c>.</summary>
    public string Label => Parameters is null || Parameters.IsEmpty ? Strategy : $"{Strategy} ({Parameters})";

    /// <summary>
    /// The default search: centroid, best-phrase, top-k at each of <see cref="DefaultK"/>, blend at each of
    /// <see cref="DefaultCentroidWeights"/>, whitened at each of <see cref="DefaultShrinkages"/>,
    /// and head at each of <see cref="DefaultL2"/> × <see cref="DefaultTemperatures"/> × <see cref="DefaultProbabilityWeights"/>
    /// (Ledoit–Wolf shrinkage; α 0.5 is left implicit) — 39 settings, three head trainings. Restricted to <paramref name="strategies"/> when given (order kept as above).
    /// </summary>
    /// <param name="strategies">Strategy names to keep, or null for all.</param>
    /// <exception cref="ArgumentException">A name is not a strategy, or the list is empty.</exception>
    public static IReadOnlyList<ScoringCandidate> DefaultGrid(IEnumerable<string>? strategies = null)
    {
        var keep = strategies?.Select(s => s.Trim()).Where(s => s.Length > 0).ToHashSet(StringComparer.Ordinal);
        if (keep is not null)
        {
            if (keep.Count == 0) throw new ArgumentException($"Name at least one scoring strategy: {string.Join(", ", StrategyNames)}.", nameof(strategies));
            foreach (var name in keep)
                if (!StrategyNames.Contains(name, StringComparer.Ordinal))
                    throw new ArgumentException($"'{name}' is not a scoring strategy; use one or more of: {string.Join(", ", StrategyNames)}.", nameof(strategies));
        }
        var grid = new List<ScoringCandidate>();
        foreach (var name in StrategyNames)
        {
            if (keep is not null && !keep.Contains(name)) continue;
            switch (name)
            {
                case "top-k":
                    foreach (var k in DefaultK) grid.Add(new ScoringCandidate(name, k == 3 ? null : new ScoringParameters { K = k }));
                    break;
                case "blend":
                    foreach (var w in DefaultCentroidWeights) grid.Add(new ScoringCandidate(name, w == 0.5 ? null : new ScoringParameters { CentroidWeight = w }));
                    break;
                case "whitened":
                    foreach (var s in DefaultShrinkages) grid.Add(new ScoringCandidate(name, s is null ? null : new ScoringParameters { Shrinkage = s }));
                    break;
                case "head":
                    foreach (var l2 in DefaultL2)
                        foreach (var t in DefaultTemperatures)
                            foreach (var w in DefaultProbabilityWeights)
                                grid.Add(new ScoringCandidate(name, new ScoringParameters
                                {
                                    L2 = l2, Temperature = t, ProbabilityWeight = w == TaskPhrase.Resolution.Scoring.TaskHead.DefaultProbabilityWeight ? null : w,
                                }));
                    break;
                default:
                    grid.Add(new ScoringCandidate(name));
                    break;
            }
        }
        return grid.AsReadOnly();
    }

    /// <summary>The resolver strategy this name selects.</summary>
    internal ScoringStrategy ToStrategy() => Strategy switch
    {
        "best-phrase" => ScoringStrategy.BestPhrase,
        "centroid" => ScoringStrategy.Centroid,
        "top-k" => ScoringStrategy.TopK,
        "blend" => ScoringStrategy.Blend,
        "whitened" => ScoringStrategy.Whitened,
        "head" => ScoringStrategy.Head,
        _ => throw new ArgumentException($"'{Strategy}' is not a scoring strategy; use one of: {string.Join(", ", StrategyNames)}."),
    };

    /// <summary>The candidate's settings on a copy of <paramref name="registry"/> (same tasks and thresholds, new content hash).</summary>
    internal TaskRegistry Apply(TaskRegistry registry)
    {
        var settings = registry.Settings with { Scoring = Strategy, ScoringParameters = Parameters is null || Parameters.IsEmpty ? null : Parameters };
        string hash = RegistryCanonicalForm.HashOf(RegistryCanonicalForm.ToJson(registry.Tasks, registry.Defaults, registry.ModelId, settings));
        return new TaskRegistry(registry.Tasks, registry.Defaults, hash, registry.ModelId, registry.SourcePath, settings);
    }

    /// <summary>Formats a parameter value as the registry writer does (shortest round trip).</summary>
    internal static string Format(double value) => value.ToString("R", CultureInfo.InvariantCulture);
}
