namespace TaskPhrase.Resolution.Scoring;

/// <summary>
/// Settings of the scorers fitted to a registry's approved phrases: <see cref="Whitening"/> (used by
/// <see cref="ScoringStrategy.Whitened"/>) and <see cref="TaskHead"/> (used by <see cref="ScoringStrategy.Head"/>), and
/// the centroid weight of <see cref="ScoringStrategy.Blend"/>. Immutable; every value is validated when set.
/// </summary>
public sealed record LearnedScoringOptions
{
    private readonly double? _shrinkage;
    private readonly double _l2 = 0.001;
    private readonly double _temperature = 1.0;
    private readonly int _maxIterations = 500;
    private readonly double _probabilityWeight = TaskHead.DefaultProbabilityWeight;
    private readonly CovarianceKind _covariance = CovarianceKind.WithinTask;
    private readonly double _blendCentroidWeight = 0.5;

    /// <summary>
    /// The defaults: within-task covariance, Ledoit–Wolf shrinkage, L2 0.001, temperature 1, 500 iterations (L2 as
    /// chosen on CLINC150, see docs/clinc150-strategies.md).
    /// </summary>
    public static LearnedScoringOptions Default { get; } = new();

    /// <summary>Which covariance the whitening is fitted to (default <see cref="CovarianceKind.WithinTask"/>).</summary>
    /// <exception cref="ArgumentOutOfRangeException">Not a defined value.</exception>
    public CovarianceKind Covariance
    {
        get => _covariance;
        init => _covariance = Enum.IsDefined(value) ? value : throw new ArgumentOutOfRangeException(nameof(Covariance), value, "Use WithinTask or Pooled.");
    }

    /// <summary>
    /// Shrinkage λ of the covariance toward the scaled identity, Σ = (1 − λ) S + λ (tr S / d) I; null (the default)
    /// estimates λ with the Ledoit–Wolf (2004) formula.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Outside [0, 1].</exception>
    public double? Shrinkage
    {
        get => _shrinkage;
        init => _shrinkage = value is null or (>= 0 and <= 1) ? value : throw new ArgumentOutOfRangeException(nameof(Shrinkage), value, "Shrinkage must lie in [0, 1], or be null for Ledoit–Wolf.");
    }

    /// <summary>
    /// L2 penalty of the head, (λ/2)·‖W‖² added to the mean cross-entropy over the approved phrases (biases are not
    /// penalised). Default 0.001.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Not in (0, 1000].</exception>
    public double L2
    {
        get => _l2;
        init => _l2 = value is > 0 and <= 1000 ? value : throw new ArgumentOutOfRangeException(nameof(L2), value, "L2 must lie in (0, 1000].");
    }

    /// <summary>Softmax temperature T of the head at resolve time, p = softmax(z / T) (training uses T = 1). Default 1.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Not in [0.01, 100].</exception>
    public double Temperature
    {
        get => _temperature;
        init => _temperature = value is >= 0.01 and <= 100 ? value : throw new ArgumentOutOfRangeException(nameof(Temperature), value, "Temperature must lie in [0.01, 100].");
    }

    /// <summary>
    /// Weight α of the head's probability p against the centroid cosine c in the task score p^α · max(0, c)^(1 − α)
    /// (resolve time, no retraining). Default 0.5, the geometric mean; 1 is p alone, 0 the centroid cosine alone.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Not in [0, 1].</exception>
    public double ProbabilityWeight
    {
        get => _probabilityWeight;
        init => _probabilityWeight = value is >= 0 and <= 1 ? value : throw new ArgumentOutOfRangeException(nameof(ProbabilityWeight), value, "ProbabilityWeight must lie in [0, 1].");
    }

    /// <summary>
    /// Weight w of the centroid cosine in the <see cref="ScoringStrategy.Blend"/> score w · centroid + (1 − w) · best
    /// phrase (default 0.5, their mean).
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Not in [0, 1].</exception>
    public double BlendCentroidWeight
    {
        get => _blendCentroidWeight;
        init => _blendCentroidWeight = value is >= 0 and <= 1 ? value : throw new ArgumentOutOfRangeException(nameof(BlendCentroidWeight), value, "BlendCentroidWeight must lie in [0, 1].");
    }

    /// <summary>Most L-BFGS iterations when training the head (default 500).</summary>
    /// <exception cref="ArgumentOutOfRangeException">Not in [1, 100,000].</exception>
    public int MaxIterations
    {
        get => _maxIterations;
        init => _maxIterations = value is >= 1 and <= 100_000 ? value : throw new ArgumentOutOfRangeException(nameof(MaxIterations), value, "MaxIterations must lie in [1, 100000].");
    }
}
