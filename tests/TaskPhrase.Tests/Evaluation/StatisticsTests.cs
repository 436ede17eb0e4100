using CsCheck;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

public class StatisticsTests
{
    // ---- Wilson score interval ----------------------------------------------------------------------------

    [Theory]
    // Newcombe (1998), "Two-sided confidence intervals for the single proportion: comparison of seven methods",
    // Statistics in Medicine 17:857–872, Table I, method 3 (score method without continuity correction).
    // The four-decimal values are recalled from memory; each is also checked below against the closed form
    // (2np̂ + z² ± z√(z² + 4np̂q̂)) / (2(n + z²)) evaluated independently in this test (the form Newcombe gives).
    [InlineData(81, 263, 0.2553, 0.3662)]
    [InlineData(15, 148, 0.0624, 0.1605)]
    [InlineData(0, 20, 0.0000, 0.1611)]
    [InlineData(1, 29, 0.0061, 0.1718)]
    public void WilsonInterval_NewcombeTableI_MatchesToFourDecimals(int successes, int n, double low, double high)
    {
        var (actualLow, actualHigh) = Statistics.WilsonInterval(successes, n);

        Assert.Equal(low, Math.Round(actualLow, 4), 10);
        Assert.Equal(high, Math.Round(actualHigh, 4), 10);
        var (formLow, formHigh) = NewcombeClosedForm(successes, n, 1.959964);
        Assert.Equal(formLow, actualLow, 12);
        Assert.Equal(formHigh, actualHigh, 12);
    }

    [Fact]
    public void WilsonInterval_NoTrials_IsWholeUnitInterval()
        => Assert.Equal((0.0, 1.0), Statistics.WilsonInterval(0, 0));

    [Fact]
    public void WilsonInterval_AllSuccesses_UpperBoundIsOneAndMirrorsZeroSuccesses()
    {
        // Symmetry of the score interval (common practice): the interval of n/n is 1 minus that of 0/n, mirrored.
        var all = Statistics.WilsonInterval(20, 20);
        var none = Statistics.WilsonInterval(0, 20);
        Assert.Equal(1.0, all.High);
        Assert.Equal(1 - none.High, all.Low, 12);
    }

    [Theory]
    [InlineData(-1, 10)]
    [InlineData(11, 10)]
    [InlineData(0, -1)]
    public void WilsonInterval_CountsOutOfRange_Throw(int successes, int n)
        => Assert.Throws<ArgumentOutOfRangeException>(() => Statistics.WilsonInterval(successes, n));

    [Fact]
    public void WilsonInterval_Property_ContainsPointEstimateAndStaysInUnitInterval()
    {
        Gen.Int[1, 2000].SelectMany(n => Gen.Int[0, n].Select(k => (k, n))).Sample((k, n) =>
        {
            var (low, high) = Statistics.WilsonInterval(k, n);
            double p = (double)k / n;
            Assert.InRange(low, 0, p + 1e-12);
            Assert.InRange(high, p - 1e-12, 1);
            var (formLow, formHigh) = NewcombeClosedForm(k, n, Statistics.Z95);
            Assert.Equal(formLow, low, 10);
            Assert.Equal(formHigh, high, 10);
        }, iter: 500);
    }

    private static (double Low, double High) NewcombeClosedForm(int r, int n, double z)
    {
        double p = (double)r / n, q = 1 - p;
        double root = z * Math.Sqrt(z * z + 4 * n * p * q);
        return ((2 * n * p + z * z - root) / (2 * (n + z * z)), (2 * n * p + z * z + root) / (2 * (n + z * z)));
    }

    // ---- AUROC -------------------------------------------------------------------------------------------

    [Fact]
    public void Auroc_ScikitLearnDocumentedExample_IsThreeQuarters()
    {
        // scikit-learn's roc_auc_score docstring example: roc_auc_score([0, 0, 1, 1], [0.1, 0.4, 0.35, 0.8]) = 0.75.
        double auc = Statistics.Auroc(positiveScores: [0.35, 0.8], negativeScores: [0.1, 0.4]);
        Assert.Equal(0.75, auc, 12);
    }

    [Fact]
    public void Auroc_TiedPair_CountsOneHalf()
    {
        // Hand count of the Mann–Whitney pairs: (0.8 > 0.5) 1, (0.8 > 0.2) 1, (0.5 = 0.5) ½, (0.5 > 0.2) 1 → 3.5 / 4.
        Assert.Equal(0.875, Statistics.Auroc([0.8, 0.5], [0.5, 0.2]), 12);
    }

    [Fact]
    public void Auroc_AllScoresTied_IsOneHalf()
        => Assert.Equal(0.5, Statistics.Auroc([0.7, 0.7, 0.7], [0.7, 0.7]), 12);

    [Fact]
    public void Auroc_EitherSideEmpty_IsNaN()
    {
        Assert.True(double.IsNaN(Statistics.Auroc([], [0.1])));
        Assert.True(double.IsNaN(Statistics.Auroc([0.1], [])));
    }

    [Fact]
    public void Auroc_NaNScore_ThrowsNamingList()
        => Assert.Equal("negativeScores", Assert.Throws<ArgumentException>(() => Statistics.Auroc([0.1], [double.NaN])).ParamName);

    [Fact]
    public void Auroc_Property_EqualsBruteForcePairCountAndTrapezoidAreaOfRocCurve()
    {
        // Scores on a coarse grid so that ties are frequent.
        var scores = Gen.Int[-4, 10].Select(i => i / 10.0).Array[1, 40];
        Gen.Select(scores, scores).Sample((pos, neg) =>
        {
            double pairs = 0;
            foreach (double p in pos)
                foreach (double n in neg)
                    pairs += p > n ? 1 : p == n ? 0.5 : 0;
            double expected = pairs / (pos.Length * neg.Length);

            Assert.Equal(expected, Statistics.Auroc(pos, neg), 10);
            var curve = Statistics.RocCurve(pos, neg);
            double area = 0;
            for (int i = 1; i < curve.Count; i++)
                area += (curve[i].Fpr - curve[i - 1].Fpr) * (curve[i].Tpr + curve[i - 1].Tpr) / 2;
            Assert.Equal(expected, area, 10);
        }, iter: 400);
    }

    // ---- ROC curve and FPR at a TPR target -----------------------------------------------------------------

    [Fact]
    public void RocCurve_ScikitLearnDocumentedExample_MatchesPoints()
    {
        // scikit-learn roc_curve docstring: y = [1, 1, 2, 2], scores = [0.1, 0.4, 0.35, 0.8], pos_label = 2 gives
        // fpr = [0, 0, 0.5, 0.5, 1], tpr = [0, 0.5, 0.5, 1, 1], thresholds = [inf, 0.8, 0.4, 0.35, 0.1].
        var curve = Statistics.RocCurve(positiveScores: [0.35, 0.8], negativeScores: [0.1, 0.4]);

        Assert.Equal([0, 0, 0.5, 0.5, 1], curve.Select(p => p.Fpr));
        Assert.Equal([0, 0.5, 0.5, 1, 1], curve.Select(p => p.Tpr));
        Assert.Equal([double.PositiveInfinity, 0.8, 0.4, 0.35, 0.1], curve.Select(p => p.Threshold));
    }

    [Fact]
    public void RocCurve_EitherSideEmpty_IsEmpty()
        => Assert.Empty(Statistics.RocCurve([0.5], []));

    [Fact]
    public void FprAtTpr_ScikitLearnExample_NeedsThresholdAtLowestPositive()
    {
        // From the curve above: TPR reaches 1 first at threshold 0.35, where FPR is 0.5; TPR 0.5 is reached at FPR 0.
        Assert.Equal(0.5, Statistics.FprAtTpr([0.35, 0.8], [0.1, 0.4], 0.95));
        Assert.Equal(0.0, Statistics.FprAtTpr([0.35, 0.8], [0.1, 0.4], 0.5));
    }

    [Fact]
    public void FprAtTpr_NineteenOfTwentyExactly_ReachesNinetyFivePercent()
    {
        // 20 positives at 0.90, 0.89, … 0.71 and negatives at 0.715 and 0.5: accepting the top 19 positives
        // (threshold 0.72) gives TPR = 19/20 = 0.95 with no negative accepted, so FPR@95%TPR is 0 (hand count).
        var positives = Enumerable.Range(0, 20).Select(i => 0.90 - i * 0.01).ToArray();
        Assert.Equal(0.0, Statistics.FprAtTpr(positives, [0.715, 0.5], 0.95));
        Assert.Equal(0.5, Statistics.FprAtTpr(positives, [0.715, 0.5], 1.0));
    }

    [Fact]
    public void FprAtTpr_Property_EqualsBruteForceOverAllThresholds()
    {
        var scores = Gen.Int[0, 20].Select(i => i / 20.0).Array[1, 30];
        Gen.Select(scores, scores, Gen.Double[0.05, 1.0]).Sample((pos, neg, target) =>
        {
            // Oracle: try every observed score (and +∞) as threshold with accept-when-score ≥ t.
            double best = 1;
            foreach (double t in pos.Concat(neg).Append(double.PositiveInfinity))
            {
                int tp = pos.Count(s => s >= t), fp = neg.Count(s => s >= t);
                if (tp >= target * pos.Length - 1e-9) best = Math.Min(best, (double)fp / neg.Length);
            }
            Assert.Equal(best, Statistics.FprAtTpr(pos, neg, target), 12);
        }, iter: 400);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(1.5)]
    [InlineData(double.NaN)]
    public void FprAtTpr_TargetOutOfRange_Throws(double target)
        => Assert.Throws<ArgumentOutOfRangeException>(() => Statistics.FprAtTpr([0.5], [0.4], target));

    // ---- Split-conformal threshold -------------------------------------------------------------------------

    [Theory]
    // Hand-checked with Angelopoulos & Bates (2021), section 1: n = 9 scores 0.9 … 0.1, s = 1 − score = 0.1 … 0.9,
    // k = ⌈(n + 1)(1 − α)⌉, q̂ = k-th smallest s, threshold = 1 − q̂.
    [InlineData(0.9, 0.1)]  // k = ⌈10 · 0.9⌉ = 9 → q̂ = 0.9 → threshold 0.1
    [InlineData(0.8, 0.2)]  // k = 8 → q̂ = 0.8 → 0.2
    [InlineData(0.5, 0.5)]  // k = 5 → q̂ = 0.5 → 0.5
    [InlineData(0.35, 0.6)] // k = ⌈3.5⌉ = 4 → q̂ = 0.4 → 0.6
    public void ConformalThreshold_NineScores_IsKthLargestScore(double coverage, double expected)
    {
        double[] scores = [0.5, 0.9, 0.1, 0.7, 0.3, 0.8, 0.2, 0.6, 0.4]; // shuffled on purpose
        Assert.Equal(expected, Statistics.ConformalThreshold(scores, coverage), 12);
    }

    [Fact]
    public void ConformalThreshold_TooFewScoresForCoverage_IsNegativeInfinity()
    {
        // n = 9, coverage 0.95: k = ⌈10 · 0.95⌉ = 10 > 9, so q̂ = +∞ and no finite threshold guarantees coverage.
        double[] scores = [0.5, 0.9, 0.1, 0.7, 0.3, 0.8, 0.2, 0.6, 0.4];
        Assert.Equal(double.NegativeInfinity, Statistics.ConformalThreshold(scores, 0.95));
        Assert.Equal(double.NegativeInfinity, Statistics.ConformalThreshold([], 0.5));
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(1.0)]
    [InlineData(-0.1)]
    public void ConformalThreshold_CoverageOutOfRange_Throws(double coverage)
        => Assert.Throws<ArgumentOutOfRangeException>(() => Statistics.ConformalThreshold([0.5], coverage));

    [Theory]
    [InlineData(9, 0.9, 9)]     // 10 · 0.9 is 9 in decimal; must not become 10 through rounding
    [InlineData(99, 0.95, 95)]
    [InlineData(19, 0.7, 14)]
    [InlineData(10, 0.9, 10)]   // ⌈9.9⌉
    public void ConformalRank_DecimalCoverage_IsExactCeiling(int n, double coverage, int expected)
        => Assert.Equal(expected, Statistics.ConformalRank(n, coverage));

    [Fact]
    public void ConformalThreshold_Property_LeaveOneOutCoverageIsAtLeastTarget()
    {
        // Exchangeability argument of Angelopoulos & Bates (2021), Theorem 1: averaged over which of n + 1 scores is
        // the test point, the coverage of the threshold calibrated on the other n is k/(n + 1) ≥ 1 − α (more with
        // ties). This holds exactly for every data set, so it is checked deterministically on each sample.
        var data = Gen.Int[0, 40].Select(i => i / 40.0).Array[1, 60];
        Gen.Select(data, Gen.Double[0.05, 0.95]).Sample((scores, coverage) =>
        {
            int covered = 0;
            for (int i = 0; i < scores.Length; i++)
            {
                var calibration = scores.Where((_, j) => j != i).ToArray();
                if (scores[i] >= Statistics.ConformalThreshold(calibration, coverage)) covered++;
            }
            Assert.True((double)covered / scores.Length >= coverage - 1e-8,
                $"coverage {covered}/{scores.Length} < {coverage} for n = {scores.Length - 1}");
        }, iter: 300);
    }

    [Fact]
    public void ConformalThreshold_MonteCarloExchangeableData_CoverageBetweenTargetAndUpperBound()
    {
        // Synthetic exchangeable data (i.i.d. draws, score = u² for uniform u), n = 49 calibration scores, α = 0.1.
        // Angelopoulos & Bates (2021), section 1 and Appendix D: for continuous scores the expected coverage lies in
        // [1 − α, 1 − α + 1/(n + 1)]. 4000 seeded trials; the band is widened by 4 standard errors.
        const int n = 49, trials = 4000;
        const double coverage = 0.9;
        var random = new Random(20240611);
        int covered = 0;
        var calibration = new double[n];
        for (int t = 0; t < trials; t++)
        {
            for (int i = 0; i < n; i++) calibration[i] = Math.Pow(random.NextDouble(), 2);
            double threshold = Statistics.ConformalThreshold(calibration, coverage);
            if (Math.Pow(random.NextDouble(), 2) >= threshold) covered++;
        }
        double rate = (double)covered / trials;
        double se = Math.Sqrt(coverage * (1 - coverage) / trials);
        Assert.InRange(rate, coverage - 4 * se, coverage + 1.0 / (n + 1) + 4 * se);
    }
}
