using System.Globalization;

namespace TaskPhrase.Registry;

/// <summary>
/// Parameters of a registry's scoring strategy, from the mapping form of its <c>scoring</c> key
/// (<c>scoring: {strategy: head, l2: 0.01, temperature: 2, probability_weight: 0.75}</c>); usually written by <c>taskphrase tune</c>.
/// A null value keeps the built-in default. Immutable, value equality.
/// </summary>
public sealed record ScoringParameters
{
    /// <summary>
    /// Shrinkage λ of the whitening covariance toward the scaled identity, in [0, 1] (strategies <c>whitened</c> and
    /// <c>head</c>); null estimates it with the Ledoit–Wolf formula.
    /// </summary>
    public double? Shrinkage { get; init; }

    /// <summary>L2 penalty of the learned head, in (0, 1000] (strategy <c>head</c>); null for 0.001.</summary>
    public double? L2 { get; init; }

    /// <summary>Softmax temperature of the learned head, in [0.01, 100] (strategy <c>head</c>); null for 1.</summary>
    public double? Temperature { get; init; }

    /// <summary>
    /// Weight of the learned head's probability against the centroid cosine in the task score, in [0, 1] (strategy
    /// <c>head</c>); null for 0.5, the geometric mean.
    /// </summary>
    public double? ProbabilityWeight { get; init; }

    /// <summary>The largest <see cref="K"/> a registry may give.</summary>
    public const int MaxK = 50;

    /// <summary>How many of a task's best phrase similarities are averaged, 1 to 50 (strategy <c>top-k</c>); null for 3.</summary>
    public int? K { get; init; }

    /// <summary>
    /// Weight of the centroid cosine against the best phrase's in the task score, in [0, 1] (strategy <c>blend</c>);
    /// null for 0.5, their mean.
    /// </summary>
    public double? CentroidWeight { get; init; }

    /// <summary>True when no parameter is set (the plain <c>scoring: NAME</c> form says the same).</summary>
    public bool IsEmpty => Shrinkage is null && L2 is null && Temperature is null && ProbabilityWeight is null && K is null && CentroidWeight is null;

    /// <summary>The set parameters as <c>key value</c> pairs in registry key order, e.g. <c>l2 0.01, temperature 2</c>; empty when none.</summary>
    public override string ToString()
    {
        var parts = new List<string>();
        if (Shrinkage is { } s) parts.Add("shrinkage " + s.ToString("R", CultureInfo.InvariantCulture));
        if (L2 is { } l) parts.Add("l2 " + l.ToString("R", CultureInfo.InvariantCulture));
        if (Temperature is { } t) parts.Add("temperature " + t.ToString("R", CultureInfo.InvariantCulture));
        if (ProbabilityWeight is { } w) parts.Add("probability_weight " + w.ToString("R", CultureInfo.InvariantCulture));
        if (K is { } k) parts.Add("k " + k.ToString(CultureInfo.InvariantCulture));
        if (CentroidWeight is { } c) parts.Add("centroid_weight " + c.ToString("R", CultureInfo.InvariantCulture));
        return string.Join(", ", parts);
    }
}
