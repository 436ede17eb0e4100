namespace TaskPhrase.Evaluation;

/// <summary>
/// The statistics behind audit reports: Wilson score intervals, AUROC, ROC curves, FPR at a TPR target and the
/// split-conformal threshold. Each method does one thing and is tested against a published example.
/// </summary>
/// <remarks>
/// Pure and thread-safe. Scores follow one convention throughout: higher means "more in scope", and a score is
/// <em>accepted</em> at threshold <c>t</c> when <c>score ≥ t</c>. Scores must not be NaN (infinities are allowed).
/// </remarks>
public static class Statistics
{
    /// <summary>The two-sided 95 % standard normal quantile, z₀.₉₇₅ ≈ 1.959964.</summary>
    public const double Z95 = 1.959964;

    /// <summary>
    /// The Wilson score interval (without continuity correction) for a binomial proportion
    /// <paramref name="successes"/> / <paramref name="n"/>:
    /// (p̂ + z²/2n ± z·√(p̂(1 − p̂)/n + z²/4n²)) / (1 + z²/n).
    /// </summary>
    /// <param name="successes">Number of successes, 0 ≤ successes ≤ n.</param>
    /// <param name="n">Number of trials, ≥ 0.</param>
    /// <param name="z">Standard normal quantile; the default gives a 95 % interval.</param>
    /// <returns>The interval, clamped to [0, 1]. For <paramref name="n"/> = 0 there is no evidence and the interval is (0, 1).</returns>
    /// <exception cref="ArgumentOutOfRangeException">A count is negative, successes exceed n, or z is not positive and finite.</exception>
    public static (double Low, double High) WilsonInterval(int successes, int n, double z = Z95)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(n);
        ArgumentOutOfRangeException.ThrowIfNegative(successes);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(successes, n);
        if (!double.IsFinite(z) || z <= 0)
            throw new ArgumentOutOfRangeException(nameof(z), z, "z must be a positive finite normal quantile, e.g. 1.959964 for 95 %.");
        if (n == 0) return (0, 1);

        double p = (double)successes / n;
        double z2 = z * z;
        double denominator = 1 + z2 / n;
        double centre = p + z2 / (2.0 * n);
        double half = z * Math.Sqrt(p * (1 - p) / n + z2 / (4.0 * n * n));
        double low = successes == 0 ? 0 : (centre - half) / denominator;
        double high = successes == n ? 1 : (centre + half) / denominator;
        return (Math.Clamp(low, 0, 1), Math.Clamp(high, 0, 1));
    }

    /// <summary>
    /// Area under the ROC curve, computed as the Mann–Whitney U statistic divided by n₊·n₋: the probability that a
    /// random positive scores higher than a random negative, a tie counting one half.
    /// </summary>
    /// <param name="positiveScores">Scores of the positives (in-scope probes).</param>
    /// <param name="negativeScores">Scores of the negatives (out-of-scope probes).</param>
    /// <returns>AUROC in [0, 1]; <see cref="double.NaN"/> when either list is empty (undefined).</returns>
    /// <exception cref="ArgumentException">A score is NaN.</exception>
    public static double Auroc(IReadOnlyList<double> positiveScores, IReadOnlyList<double> negativeScores)
    {
        ArgumentNullException.ThrowIfNull(positiveScores);
        ArgumentNullException.ThrowIfNull(negativeScores);
        RequireNoNaN(positiveScores, nameof(positiveScores));
        RequireNoNaN(negativeScores, nameof(negativeScores));
        int nPos = positiveScores.Count, nNeg = negativeScores.Count;
        if (nPos == 0 || nNeg == 0) return double.NaN;

        // Rank all scores together (ascending), ties sharing their mid-rank; U₊ = R₊ − n₊(n₊ + 1)/2.
        var all = new (double Score, bool Positive)[nPos + nNeg];
        for (int i = 0; i < nPos; i++) all[i] = (positiveScores[i], true);
        for (int i = 0; i < nNeg; i++) all[nPos + i] = (negativeScores[i], false);
        Array.Sort(all, static (a, b) => a.Score.CompareTo(b.Score));

        double positiveRankSum = 0;
        int start = 0;
        while (start < all.Length)
        {
            int end = start;
            while (end + 1 < all.Length && all[end + 1].Score.CompareTo(all[start].Score) == 0) end++;
            double midRank = (start + end) / 2.0 + 1; // 1-based mid-rank of the tie group
            for (int i = start; i <= end; i++)
                if (all[i].Positive) positiveRankSum += midRank;
            start = end + 1;
        }
        double u = positiveRankSum - nPos * (nPos + 1.0) / 2.0;
        return u / ((double)nPos * nNeg);
    }

    /// <summary>
    /// The ROC curve of the rule "accept when score ≥ threshold": one point per distinct score (thresholds
    /// decreasing), preceded by (0, 0) at threshold +∞. The last point is always (1, 1). No points are dropped.
    /// </summary>
    /// <param name="positiveScores">Scores of the positives.</param>
    /// <param name="negativeScores">Scores of the negatives.</param>
    /// <returns>The points; empty when either list is empty (the rates would be undefined).</returns>
    /// <exception cref="ArgumentException">A score is NaN.</exception>
    public static IReadOnlyList<RocPoint> RocCurve(IReadOnlyList<double> positiveScores, IReadOnlyList<double> negativeScores)
    {
        ArgumentNullException.ThrowIfNull(positiveScores);
        ArgumentNullException.ThrowIfNull(negativeScores);
        RequireNoNaN(positiveScores, nameof(positiveScores));
        RequireNoNaN(negativeScores, nameof(negativeScores));
        int nPos = positiveScores.Count, nNeg = negativeScores.Count;
        if (nPos == 0 || nNeg == 0) return [];

        var all = new (double Score, bool Positive)[nPos + nNeg];
        for (int i = 0; i < nPos; i++) all[i] = (positiveScores[i], true);
        for (int i = 0; i < nNeg; i++) all[nPos + i] = (negativeScores[i], false);
        Array.Sort(all, static (a, b) => b.Score.CompareTo(a.Score));

        var points = new List<RocPoint> { new(0, 0, double.PositiveInfinity) };
        int tp = 0, fp = 0, index = 0;
        while (index < all.Length)
        {
            double threshold = all[index].Score;
            while (index < all.Length && all[index].Score.CompareTo(threshold) == 0)
            {
                if (all[index].Positive) tp++; else fp++;
                index++;
            }
            points.Add(new RocPoint((double)fp / nNeg, (double)tp / nPos, threshold));
        }
        return points;
    }

    /// <summary>
    /// The smallest false-positive rate among the thresholds of <see cref="RocCurve"/> whose true-positive rate is at
    /// least <paramref name="targetTpr"/> (accept when score ≥ threshold). With targetTpr = 0.95 this is FPR@95%TPR.
    /// </summary>
    /// <param name="positiveScores">Scores of the positives.</param>
    /// <param name="negativeScores">Scores of the negatives.</param>
    /// <param name="targetTpr">The true-positive rate to reach, in (0, 1].</param>
    /// <returns>The false-positive rate; <see cref="double.NaN"/> when either list is empty.</returns>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="targetTpr"/> is not in (0, 1].</exception>
    /// <exception cref="ArgumentException">A score is NaN.</exception>
    public static double FprAtTpr(IReadOnlyList<double> positiveScores, IReadOnlyList<double> negativeScores, double targetTpr = 0.95)
    {
        if (!(targetTpr > 0 && targetTpr <= 1))
            throw new ArgumentOutOfRangeException(nameof(targetTpr), targetTpr, "The target true-positive rate must be in (0, 1], e.g. 0.95.");
        var curve = RocCurve(positiveScores, negativeScores);
        if (curve.Count == 0) return double.NaN;
        // Compare counts, not rates, so that 19/20 reaches 0.95 despite rounding: tp ≥ target·n₊ (with a 1e-9 slack).
        double needed = targetTpr * positiveScores.Count - 1e-9;
        foreach (var point in curve)
        {
            // FPR never decreases along the curve, so the first point that reaches the target has the smallest FPR.
            if (point.Tpr * positiveScores.Count >= needed) return point.Fpr;
        }
        return 1; // unreachable: the last point has TPR 1
    }

    /// <summary>
    /// Split-conformal accept threshold (Angelopoulos &amp; Bates, 2021, "A Gentle Introduction to Conformal Prediction
    /// and Distribution-Free Uncertainty Quantification", section 1): with nonconformity sᵢ = 1 − scoreᵢ over the n
    /// in-scope calibration scores and α = 1 − <paramref name="coverage"/>, q̂ is the ⌈(n + 1)(1 − α)⌉/n empirical
    /// quantile of s, i.e. its k-th smallest value with k = ⌈(n + 1)(1 − α)⌉. An utterance is accepted when
    /// 1 − score ≤ q̂, i.e. score ≥ 1 − q̂; this method returns that score threshold, 1 − q̂, which equals the k-th
    /// largest calibration score. For a new in-scope utterance exchangeable with the calibration set,
    /// P(score ≥ threshold) ≥ <paramref name="coverage"/>.
    /// </summary>
    /// <param name="inScopeScores">Scores of in-scope calibration probes (exchangeable with future in-scope input).</param>
    /// <param name="coverage">Target coverage 1 − α, in (0, 1), e.g. 0.95.</param>
    /// <returns>
    /// The score threshold. When k &gt; n (too few calibration scores for the coverage: fewer than ⌈1/α⌉ − 1) no
    /// finite threshold guarantees the coverage, q̂ = +∞ and the result is <see cref="double.NegativeInfinity"/>
    /// ("accept everything"); callers should treat that as "collect more calibration probes", not as a threshold.
    /// Products (n + 1)(1 − α) within 1e-9 of an integer count as that integer, so decimal coverages behave as written.
    /// </returns>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="coverage"/> is not in (0, 1).</exception>
    /// <exception cref="ArgumentException">A score is NaN.</exception>
    public static double ConformalThreshold(IReadOnlyList<double> inScopeScores, double coverage)
    {
        ArgumentNullException.ThrowIfNull(inScopeScores);
        RequireNoNaN(inScopeScores, nameof(inScopeScores));
        int n = inScopeScores.Count;
        int k = ConformalRank(n, coverage);
        if (k > n) return double.NegativeInfinity;
        var sorted = inScopeScores.ToArray();
        Array.Sort(sorted);
        // The k-th largest score (= 1 − the k-th smallest nonconformity), taken directly to avoid 1 − (1 − x) rounding.
        return sorted[n - k];
    }

    /// <summary>k = ⌈(n + 1)·coverage⌉, the rank of q̂ among the n nonconformity scores (may exceed n).</summary>
    internal static int ConformalRank(int n, double coverage)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(n);
        if (!(coverage > 0 && coverage < 1))
            throw new ArgumentOutOfRangeException(nameof(coverage), coverage, "Coverage must be in (0, 1), e.g. 0.95.");
        double product = (n + 1) * coverage;
        double nearest = Math.Round(product);
        double k = Math.Abs(product - nearest) <= 1e-9 * Math.Max(1, product) ? nearest : Math.Ceiling(product);
        return (int)Math.Max(1, k);
    }

    private static void RequireNoNaN(IReadOnlyList<double> scores, string name)
    {
        for (int i = 0; i < scores.Count; i++)
        {
            if (double.IsNaN(scores[i]))
                throw new ArgumentException($"Score {i} is NaN; every score must be a number (use -1 for \"no score\").", name);
        }
    }
}
