using TaskPhrase.Evaluation;
using static TaskPhrase.Tests.Evaluation.TuningTestData;

namespace TaskPhrase.Tests.Evaluation;

// Split conformal prediction as in Angelopoulos & Bates (2021), "A Gentle Introduction to Conformal Prediction and
// Distribution-Free Uncertainty Quantification", section 1: non-conformity s = 1 - score of the true class,
// q-hat = the ceil((n+1)(1-alpha))/n empirical quantile of the n calibration scores, and for exchangeable data
// 1 - alpha <= P(covered) <= 1 - alpha + 1/(n+1) (the upper bound when scores have no ties).
public class TuningCoverageTests
{
    private static readonly float[] HandScores = [0.91f, 0.85f, 0.80f, 0.78f, 0.74f, 0.70f, 0.66f, 0.62f, 0.55f];

    private static ScoredProbe[] HandSuite()
        => HandScores.Select(s => InScope("water-basil", "water-basil", s)).Append(OutOfScope("water-basil", 0.64f)).ToArray();

    [Fact]
    public void TuneForCoverage_HandWorkedExample_GivesQuantileByHand()
    {
        // n = 9, R = 0.8: k = ceil(10 * 0.8) = 8; the 8th smallest s = 1 - 0.62 = 0.38, so q-hat = 0.38 and the
        // threshold is 0.62. The next lower score is 0.55; the midpoint 0.585 of (0.55, 0.62] is written 0.6.
        var result = new ThresholdTuner().TuneForCoverage(HandSuite(), 0.8, 0.04f);
        Assert.True(result.Feasible);
        Assert.Equal(0.38, result.ConformalQuantile!.Value, 6);
        Assert.Equal(0.6f, result.Accept);
        Assert.Equal(8.0 / 9, result.AchievedCoverage!.Value, 12);
        // The out-of-scope probe at 0.64 passes the threshold: reported, not hidden.
        Assert.Equal(1, result.Metrics.FalseAcceptRate.Count);
        Assert.Equal(TuningMode.Coverage, result.Mode);
    }

    [Fact]
    public void TuneForCoverage_TooFewProbes_IsInfeasibleAndSaysHowMany()
    {
        // R = 0.95 needs n >= R/(1-R) = 19; with n = 9, k = ceil(10 * 0.95) = 10 > 9.
        var result = new ThresholdTuner().TuneForCoverage(HandSuite(), 0.95, 0.04f);
        Assert.False(result.Feasible);
        Assert.Null(result.ConformalQuantile);
        Assert.Contains(result.Notes, n => n.Contains("at least 19 in-scope probes"));
        Assert.Equal(1.0, result.AchievedCoverage);
    }

    [Theory]
    // (n+1) * R computed in doubles: 25 * 0.28 = 7.000000000000001 and 100 * 0.07 = 7.000000000000001,
    // whose exact values are 7 (common practice: guard ceil against representation error).
    [InlineData(24, 0.28, 7)]
    [InlineData(99, 0.07, 7)]
    [InlineData(9, 0.8, 8)]
    [InlineData(19, 0.95, 19)]
    [InlineData(18, 0.95, 19)]
    public void ConformalRank_RoundingEdges_GiveExactCeiling(int n, double r, int expected)
        => Assert.Equal(expected, ThresholdTuner.ConformalRank(n, r));

    [Fact]
    public void TuneForCoverage_ExpectedTaskNotBest_UsesRunnerUpOrLowerBound()
    {
        ScoredProbe[] probes =
        [
            InScope("keys-hook", "hall-light", 0.8f, "keys-hook", 0.7f),  // expected is the runner-up: 0.7
            InScope("keys-hook", "hall-light", 0.8f, "water-basil", 0.7f), // expected unknown: -1
            InScope("keys-hook", "hall-light", 0.8f) with { ExpectedTaskScore = 0.3f },
        ];
        Assert.Equal(0.7f, probes[0].ScoreOfExpected);
        Assert.Equal(-1f, probes[1].ScoreOfExpected);
        Assert.Equal(0.3f, probes[2].ScoreOfExpected);
        Assert.Null(OutOfScope("keys-hook", 0.8f).ScoreOfExpected);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(1.0)]
    [InlineData(double.NaN)]
    public void TuneForCoverage_TargetOutOfRange_Throws(double r)
        => Assert.Throws<ArgumentOutOfRangeException>(() => new ThresholdTuner().TuneForCoverage(HandSuite(), r, 0.04f));

    [Theory]
    [InlineData(0.9, 40)]
    [InlineData(0.8, 25)]
    public void TuneForCoverage_ExchangeableData_CoversAtLeastTargetOnAverage(double target, int n)
    {
        // Calibration and test scores drawn i.i.d. (hence exchangeable) from a skewed continuous distribution;
        // the average test coverage over many calibrations must lie in [R, R + 1/(n+1)] up to sampling noise.
        var random = new Random(20240611); // System.Random with a seed is deterministic across runs in .NET.
        var tuner = new ThresholdTuner();
        const int trials = 400, testSize = 200;
        double sum = 0;
        for (int t = 0; t < trials; t++)
        {
            var calibration = Enumerable.Range(0, n).Select(_ => InScope("blanket", "blanket", Draw(random))).ToArray();
            var result = tuner.TuneForCoverage(calibration, target, 0f);
            int covered = 0;
            for (int i = 0; i < testSize; i++) if (Draw(random) >= result.Accept) covered++;
            sum += (double)covered / testSize;
        }
        double mean = sum / trials;
        // Standard error of the mean coverage is about sqrt(R(1-R)/(n+2) / trials) < 0.0025 here; allow 4 of them.
        Assert.InRange(mean, target - 0.01, target + 1.0 / (n + 1) + 0.01);
    }

    [Fact]
    public void TuneForCoverage_NaiveQuantile_WouldUnderCover()
    {
        // Control for the property above, so that it can tell the finite-sample correction apart: with n = 9 and
        // R = 0.85 the naive ceil(nR) = 8th largest score covers 8/10 of fresh points on average, below R, while
        // ceil((n+1)R) = 9 covers 9/10 (the k/(n+1) law of order statistics of exchangeable data).
        var random = new Random(7); // System.Random with a seed is deterministic across runs in .NET.
        const int n = 9, trials = 4000;
        const double target = 0.85;
        var tuner = new ThresholdTuner();
        double naive = 0, corrected = 0;
        for (int t = 0; t < trials; t++)
        {
            var cal = Enumerable.Range(0, n).Select(_ => Draw(random)).OrderDescending().ToArray();
            float naiveThreshold = cal[(int)Math.Ceiling(n * target) - 1];
            var result = tuner.TuneForCoverage(cal.Select(s => InScope("blanket", "blanket", s)).ToArray(), target, 0f);
            float test = Draw(random);
            if (test >= naiveThreshold) naive++;
            if (test >= result.Accept) corrected++;
        }
        Assert.InRange(naive / trials, 0.78, 0.83);
        Assert.InRange(corrected / trials, 0.88, 0.93);
    }

    private static float Draw(Random random) => (float)(1 - Math.Pow(random.NextDouble(), 3)) * 0.9f;
}
