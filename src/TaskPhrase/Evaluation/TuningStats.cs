namespace TaskPhrase.Evaluation;

/// <summary>Small statistics helpers for tuning (kept internal; the audit code has its own).</summary>
internal static class TuningStats
{
    /// <summary>The standard normal quantile for a two-sided 95 % interval (z at 0.975).</summary>
    public const double Z95 = 1.959963984540054;

    /// <summary>
    /// Wilson score interval for a binomial proportion (Wilson 1927), without continuity correction:
    /// centre (k + z²/2) / (n + z²), half-width z·√(k(n−k)/n + z²/4) / (n + z²). Returns [0, 1] when n is 0.
    /// </summary>
    public static (double Lower, double Upper) Wilson(int successes, int total, double z = Z95)
    {
        if (total < 0) throw new ArgumentOutOfRangeException(nameof(total), total, "The number of trials cannot be negative.");
        if (successes < 0 || successes > total)
        {
            throw new ArgumentOutOfRangeException(nameof(successes), successes, $"The number of successes must lie in 0..{total}.");
        }
        if (total == 0) return (0, 1);
        double n = total, k = successes, z2 = z * z;
        double centre = (k + z2 / 2) / (n + z2);
        double half = z * Math.Sqrt(k * (n - k) / n + z2 / 4) / (n + z2);
        // The exact bounds at k = 0 and k = n are 0 and 1; clamp rounding noise.
        double lower = successes == 0 ? 0 : Math.Max(0, centre - half);
        double upper = successes == total ? 1 : Math.Min(1, centre + half);
        return (lower, upper);
    }
}
