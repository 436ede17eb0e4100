using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Tests.Resolution.Scoring;

public class WhiteningTests
{
    /// <summary>Deterministic synthetic phrases: <paramref name="tasks"/> clusters of <paramref name="perTask"/> points.</summary>
    internal static (float[] Phrases, int[] Labels) Clusters(int tasks, int perTask, int dims, int seed = 7, double spread = 0.3)
    {
        var rng = new Random(seed);
        var centres = Enumerable.Range(0, tasks * dims).Select(_ => rng.NextDouble() * 2 - 1).ToArray();
        var phrases = new float[tasks * perTask * dims];
        var labels = new int[tasks * perTask];
        for (int t = 0, row = 0; t < tasks; t++)
            for (int j = 0; j < perTask; j++, row++)
            {
                labels[row] = t;
                for (int a = 0; a < dims; a++)
                    phrases[row * dims + a] = (float)(centres[t * dims + a] + spread * (a + 1) * (rng.NextDouble() * 2 - 1));
            }
        return (phrases, labels);
    }

    [Fact]
    public void Fit_HandWorkedExample_GivesLedoitWolfShrinkage()
    {
        // Ledoit & Wolf (2004), "A well-conditioned estimator for large-dimensional covariance matrices", Lemma 3.2–3.4,
        // in the form scikit-learn's ledoit_wolf_shrinkage uses (from memory). Hand computed for the centred samples
        // (1,0), (−1,0), (0,2), (0,−2): S = diag(1/2, 2), μ = 5/4, d² = ‖S − μI‖²/p = 9/16,
        // b̄² = (Σ‖x‖⁴/n − ‖S‖²_F)/(p n) = (34/4 − 17/4)/8 = 17/32, shrinkage = b̄²/d² = 17/18.
        float[] x = [1, 0, -1, 0, 0, 2, 0, -2];
        var w = Whitening.Fit(x, [0, 0, 0, 0], 1, 2);
        Assert.Equal(17.0 / 18, w.Shrinkage, 12);
    }

    [Fact]
    public void Fit_NoShrinkage_WhitenedResidualsHaveIdentityCovariance()
    {
        // Property of whitening (common practice): the within-task scatter of W(x − m) is the identity when λ = 0.
        const int d = 6;
        var (x, labels) = Clusters(tasks: 4, perTask: 40, dims: d);
        var w = Whitening.Fit(x, labels, 4, d, new LearnedScoringOptions { Shrinkage = 0 });
        var y = new float[x.Length];
        for (int i = 0; i < labels.Length; i++) w.Apply(x.AsSpan(i * d, d), y.AsSpan(i * d, d));
        var means = new double[4 * d];
        for (int i = 0; i < labels.Length; i++) for (int a = 0; a < d; a++) means[labels[i] * d + a] += y[i * d + a] / 40.0;
        for (int a = 0; a < d; a++)
            for (int b = 0; b < d; b++)
            {
                double s = 0;
                for (int i = 0; i < labels.Length; i++)
                    s += (y[i * d + a] - means[labels[i] * d + a]) * (y[i * d + b] - means[labels[i] * d + b]);
                Assert.Equal(a == b ? 1.0 : 0.0, s / labels.Length, 4);
            }
    }

    [Theory]
    [InlineData(6)]
    [InlineData(70)] // rows of 1 to 70 values: groups of four rows with one block count, and the single rows between
    public void Apply_AnyWidth_BitIdenticalToOneDotPerRow(int d)
    {
        // y[a] = Σ W[a, 0..a]·(x − m)[0..a] with the deterministic dot (Kernels.Dot), row by row: the reference.
        var (x, labels) = Clusters(tasks: 3, perTask: 2 * d, dims: d);
        var w = Whitening.Fit(x, labels, 3, d);
        var (lower, mean) = w.Parameters;
        var y = new float[d];
        for (int i = 0; i < labels.Length; i += 7)
        {
            var e = x.AsSpan(i * d, d);
            w.Apply(e, y);
            var centred = new float[d];
            for (int a = 0; a < d; a++) centred[a] = e[a] - mean[a];
            for (int a = 0, k = 0; a < d; k += a + 1, a++)
                Assert.Equal(BitConverter.SingleToInt32Bits(Kernels.Dot(lower.AsSpan(k, a + 1), centred.AsSpan(0, a + 1))), BitConverter.SingleToInt32Bits(y[a]));
        }
    }

    [Fact]
    public void ScoreTasks_TaskMean_ScoresOneForItsTask()
    {
        const int d = 5;
        var (x, labels) = Clusters(tasks: 3, perTask: 10, dims: d);
        var w = Whitening.Fit(x, labels, 3, d);
        var mean = new float[d];
        for (int i = 10; i < 20; i++) for (int a = 0; a < d; a++) mean[a] += x[i * d + a] / 10f;
        var scores = new float[3];
        w.ScoreTasks(mean, scores);
        Assert.Equal(1f, scores[1], 4);
        Assert.True(scores[0] < 0.9f && scores[2] < 0.9f, string.Join(", ", scores));
        Assert.InRange(w.Shrinkage, 0, 1);
    }

    [Fact]
    public void Fit_SameInputsTwice_ByteIdentical()
    {
        var (x, labels) = Clusters(tasks: 5, perTask: 8, dims: 20);
        Assert.Equal(Whitening.Fit(x, labels, 5, 20).ToBytes(), Whitening.Fit(x, labels, 5, 20).ToBytes());
    }

    [Fact]
    public void FromBytes_RoundTrip_SameScoresAndBytes()
    {
        const int d = 12;
        var (x, labels) = Clusters(tasks: 4, perTask: 6, dims: d);
        var w = Whitening.Fit(x, labels, 4, d, new LearnedScoringOptions { Covariance = CovarianceKind.Pooled });
        var bytes = w.ToBytes();
        var back = Whitening.FromBytes(bytes);
        Assert.Equal(bytes, back.ToBytes());
        Assert.Equal((w.Dimensions, w.TaskCount, w.Covariance, w.Shrinkage, w.TrainingDigest), (back.Dimensions, back.TaskCount, back.Covariance, back.Shrinkage, back.TrainingDigest));
        float[] a = new float[4], b = new float[4];
        w.ScoreTasks(x.AsSpan(0, d), a);
        back.ScoreTasks(x.AsSpan(0, d), b);
        Assert.Equal(a, b);
    }

    [Fact]
    public void FromBytes_OneByteFlipped_FailsSha256Check()
    {
        var (x, labels) = Clusters(tasks: 3, perTask: 4, dims: 8);
        var bytes = Whitening.Fit(x, labels, 3, 8).ToBytes();
        bytes[bytes.Length / 2] ^= 0x10;
        var e = Assert.Throws<FormatException>(() => Whitening.FromBytes(bytes));
        Assert.Contains("SHA-256", e.Message);
    }

    [Fact]
    public void FromBytes_Truncated_Fails()
    {
        var (x, labels) = Clusters(tasks: 3, perTask: 4, dims: 8);
        var bytes = Whitening.Fit(x, labels, 3, 8).ToBytes();
        Assert.Throws<FormatException>(() => Whitening.FromBytes(bytes.AsSpan(0, 20)));
        Assert.Throws<FormatException>(() => Whitening.FromBytes(bytes.AsSpan(0, bytes.Length - 1)));
    }

    [Fact]
    public void FromBytes_TaskHeadBytes_FailsOnMagic()
    {
        var (x, labels) = Clusters(tasks: 3, perTask: 4, dims: 8);
        var head = TaskHead.Train(x, labels, 3, [], 8).ToBytes();
        var e = Assert.Throws<FormatException>(() => Whitening.FromBytes(head));
        Assert.Contains("magic 'TPWH'", e.Message);
    }

    [Fact]
    public void Fit_OnePhrasePerTask_UsesIdentity()
    {
        float[] x = [1, 0, 0, 1];
        var w = Whitening.Fit(x, [0, 1], 2, 2);
        Assert.Equal(1.0, w.Shrinkage);
        var y = new float[2];
        w.Apply([1, 0], y);
        Assert.Equal([0.5f, -0.5f], y); // x − m with m = (0.5, 0.5), W = I
    }

    [Fact]
    public void Fit_TaskWithoutPhrase_ThrowsNamingTask()
    {
        var e = Assert.Throws<ArgumentException>(() => Whitening.Fit([1, 0, 0, 1], [0, 0], 2, 2));
        Assert.Contains("Task position 1 has no approved phrase", e.Message);
    }

    [Fact]
    public void Fit_LabelOutOfRange_ThrowsNamingRow()
    {
        var e = Assert.Throws<ArgumentException>(() => Whitening.Fit([1, 0, 0, 1], [0, 2], 2, 2));
        Assert.Contains("Phrase row 1 has task position 2", e.Message);
    }

    [Fact]
    public void Options_ShrinkageOutOfRange_Throws()
        => Assert.Throws<ArgumentOutOfRangeException>(() => new LearnedScoringOptions { Shrinkage = 1.5 });
}
