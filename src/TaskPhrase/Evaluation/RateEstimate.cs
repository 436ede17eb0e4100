namespace TaskPhrase.Evaluation;

/// <summary>
/// A rate with its evidence: <see cref="Count"/> of <see cref="Total"/>, and a 95 % Wilson score interval
/// (<see cref="Statistics.WilsonInterval"/>). Immutable.
/// </summary>
public sealed record RateEstimate
{
    /// <summary>Creates the estimate of <paramref name="count"/> / <paramref name="total"/>.</summary>
    /// <param name="count">Number of probes with the property, 0 ≤ count ≤ total.</param>
    /// <param name="total">Number of probes the rate is taken over (its denominator), ≥ 0.</param>
    /// <exception cref="ArgumentOutOfRangeException">A count is negative or count exceeds total.</exception>
    public RateEstimate(int count, int total)
    {
        (CiLow, CiHigh) = Statistics.WilsonInterval(count, total);
        Count = count;
        Total = total;
        Value = total == 0 ? double.NaN : (double)count / total;
    }

    /// <summary>Count / Total; <see cref="double.NaN"/> when <see cref="Total"/> is 0 (JSON writes <c>null</c>).</summary>
    public double Value { get; }

    /// <summary>The numerator.</summary>
    public int Count { get; }

    /// <summary>The denominator.</summary>
    public int Total { get; }

    /// <summary>Lower end of the 95 % Wilson score interval (0 when Total is 0).</summary>
    public double CiLow { get; }

    /// <summary>Upper end of the 95 % Wilson score interval (1 when Total is 0).</summary>
    public double CiHigh { get; }

    /// <summary>Invariant text such as <c>0.9500 (19/20, 95% CI 0.7639-0.9911)</c>.</summary>
    public override string ToString()
        => string.Create(System.Globalization.CultureInfo.InvariantCulture,
            $"{Value:0.0000} ({Count}/{Total}, 95% CI {CiLow:0.0000}-{CiHigh:0.0000})");
}
