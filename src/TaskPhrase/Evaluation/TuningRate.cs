namespace TaskPhrase.Evaluation;

/// <summary>A rate measured on a tuning suite: count, denominator, the rate and its 95 % Wilson score interval. Immutable.</summary>
public sealed record TuningRate
{
    /// <summary>Creates a rate of <paramref name="count"/> out of <paramref name="total"/>.</summary>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="total"/> is negative or <paramref name="count"/> is outside 0..total.</exception>
    public TuningRate(int count, int total)
    {
        (Lower, Upper) = TuningStats.Wilson(count, total);
        Count = count;
        Total = total;
        Rate = total == 0 ? 0 : (double)count / total;
    }

    /// <summary>How many probes were counted.</summary>
    public int Count { get; }

    /// <summary>Out of how many probes.</summary>
    public int Total { get; }

    /// <summary><see cref="Count"/> / <see cref="Total"/>; 0 when <see cref="Total"/> is 0.</summary>
    public double Rate { get; }

    /// <summary>Lower end of the 95 % Wilson score interval (0 when <see cref="Total"/> is 0).</summary>
    public double Lower { get; }

    /// <summary>Upper end of the 95 % Wilson score interval (1 when <see cref="Total"/> is 0).</summary>
    public double Upper { get; }

    /// <inheritdoc/>
    public override string ToString()
        => string.Create(System.Globalization.CultureInfo.InvariantCulture,
            $"{Rate:0.0000} ({Count}/{Total}, 95% CI {Lower:0.0000}-{Upper:0.0000})");
}
