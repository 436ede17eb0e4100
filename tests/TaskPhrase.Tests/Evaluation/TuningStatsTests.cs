using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

public class TuningStatsTests
{
    [Theory]
    // Newcombe (1998), "Two-sided confidence intervals for the single proportion: comparison of seven methods",
    // Statistics in Medicine 17:857-872, Table II, method 3 (Wilson score without continuity correction);
    // values from memory, four decimals.
    [InlineData(81, 263, 0.2553, 0.3662)]
    [InlineData(15, 148, 0.0624, 0.1605)]
    [InlineData(0, 20, 0.0000, 0.1611)]
    [InlineData(1, 29, 0.0061, 0.1718)]
    public void Wilson_PublishedExamples_Match(int k, int n, double lower, double upper)
    {
        var (lo, hi) = TuningStats.Wilson(k, n);
        Assert.Equal(lower, lo, 0.00006);
        Assert.Equal(upper, hi, 0.00006);
    }

    [Fact]
    public void Wilson_AllSuccesses_UpperIsOne()
        => Assert.Equal(1.0, TuningStats.Wilson(29, 29).Upper);

    [Fact]
    public void Wilson_NoTrials_IsWholeRange()
        => Assert.Equal((0.0, 1.0), TuningStats.Wilson(0, 0));

    [Fact]
    public void TuningRate_ZeroTotal_HasRateZeroAndFullInterval()
    {
        var r = new TuningRate(0, 0);
        Assert.Equal((0.0, 0.0, 1.0), (r.Rate, r.Lower, r.Upper));
    }

    [Fact]
    public void TuningRate_CountAboveTotal_Throws()
        => Assert.Throws<ArgumentOutOfRangeException>(() => new TuningRate(5, 4));
}
