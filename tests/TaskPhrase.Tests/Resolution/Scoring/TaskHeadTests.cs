using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Tests.Resolution.Scoring;

public class TaskHeadTests
{
    [Fact]
    public void Train_SymmetricTwoPointProblem_MatchesHandSolvedOptimum()
    {
        // Two tasks, one phrase each at x = +1 and x = −1 (one dimension). By symmetry the optimum has w₀ = a, w₁ = −a
        // and equal biases; the objective −log σ(2a) + λa² is stationary where λa = 1 − σ(2a) (derived by hand), which
        // the test solves by bisection, independently of the trainer.
        foreach (double l2 in new[] { 0.1, 1.0, 5.0 })
        {
            var head = TaskHead.Train([1f, -1f], [0, 1], 2, [], 1, new LearnedScoringOptions { L2 = l2 });
            double lo = 0, hi = 20;
            for (int i = 0; i < 200; i++)
            {
                double mid = 0.5 * (lo + hi);
                if (l2 * mid < 1 - Sigmoid(2 * mid)) lo = mid; else hi = mid;
            }
            var p = new float[2];
            head.Predict([1f], p, new float[1]);
            Assert.Equal(Sigmoid(2 * lo), p[0], 4);
            head.Predict([-1f], p, new float[1]);
            Assert.Equal(Sigmoid(2 * lo), p[1], 4);
        }
    }

    private static double Sigmoid(double z) => 1 / (1 + Math.Exp(-z));

    [Fact]
    public void Train_SeparableClusters_ClassifiesTrainingPoints()
    {
        const int d = 16;
        var (x, labels) = WhiteningTests.Clusters(tasks: 6, perTask: 10, dims: d, spread: 0.05);
        var head = TaskHead.Train(x, labels, 6, [], d);
        var p = new float[6];
        var f = new float[d];
        for (int i = 0; i < labels.Length; i++)
        {
            head.Predict(x.AsSpan(i * d, d), p, f);
            Assert.Equal(labels[i], Array.IndexOf(p, p.Max()));
        }
        Assert.Equal(1f, p.Sum(), 5);
        Assert.False(head.HasRejectClass);
    }

    [Fact]
    public void Train_SameInputsTwice_ByteIdentical()
    {
        const int d = 24;
        var (x, labels) = WhiteningTests.Clusters(tasks: 7, perTask: 5, dims: d);
        var reject = x.AsSpan(0, 2 * d).ToArray().Select(v => -v).ToArray();
        var a = TaskHead.Train(x, labels, 7, reject, d, new LearnedScoringOptions { L2 = 0.05 }).ToBytes();
        var b = TaskHead.Train(x, labels, 7, reject, d, new LearnedScoringOptions { L2 = 0.05 }).ToBytes();
        Assert.Equal(a, b);
    }

    [Fact]
    public void FromBytes_RoundTrip_SamePredictions()
    {
        const int d = 10;
        var (x, labels) = WhiteningTests.Clusters(tasks: 4, perTask: 6, dims: d);
        var head = TaskHead.Train(x, labels, 4, x.AsSpan(0, d).ToArray(), d, new LearnedScoringOptions { Temperature = 2 });
        var bytes = head.ToBytes();
        var back = TaskHead.FromBytes(bytes);
        Assert.Equal(bytes, back.ToBytes());
        Assert.Equal((head.Classes, head.HasRejectClass, head.L2, head.Temperature, head.Iterations, head.TrainingDigest),
            (back.Classes, back.HasRejectClass, back.L2, back.Temperature, back.Iterations, back.TrainingDigest));
        float[] s1 = new float[4], s2 = new float[4];
        float r1 = head.ScoreTasks(x.AsSpan(3 * d, d), s1, out float b1);
        float r2 = back.ScoreTasks(x.AsSpan(3 * d, d), s2, out float b2);
        Assert.Equal(s1, s2);
        Assert.Equal((r1, b1), (r2, b2));
    }

    [Fact]
    public void FromBytes_OneByteFlipped_FailsSha256Check()
    {
        var (x, labels) = WhiteningTests.Clusters(tasks: 3, perTask: 4, dims: 8);
        var bytes = TaskHead.Train(x, labels, 3, [], 8).ToBytes();
        bytes[40] ^= 0x01;
        var e = Assert.Throws<FormatException>(() => TaskHead.FromBytes(bytes));
        Assert.Contains("SHA-256", e.Message);
    }

    [Fact]
    public void Train_MustRejectCluster_WinsItsOwnClass()
    {
        const int d = 8;
        var (x, labels) = WhiteningTests.Clusters(tasks: 4, perTask: 8, dims: d, spread: 0.05);
        var (r, _) = WhiteningTests.Clusters(tasks: 1, perTask: 8, dims: d, seed: 99, spread: 0.05);
        var head = TaskHead.Train(x, labels, 4, r, d);
        Assert.True(head.HasRejectClass);
        Assert.Equal(5, head.Classes);
        var scores = new float[4];
        float reject = head.ScoreTasks(r.AsSpan(0, d), scores, out float best);
        Assert.True(reject > best, $"look-alike {reject} vs best task {best}");
        reject = head.ScoreTasks(x.AsSpan(0, d), scores, out best);
        Assert.True(reject < best, $"look-alike {reject} vs best task {best}");
    }

    [Fact]
    public void WithTemperature_Higher_FlattensButKeepsOrder()
    {
        const int d = 12;
        var (x, labels) = WhiteningTests.Clusters(tasks: 5, perTask: 6, dims: d);
        var head = TaskHead.Train(x, labels, 5, [], d);
        float[] p1 = new float[5], p4 = new float[5], f = new float[d];
        head.Predict(x.AsSpan(7 * d, d), p1, f);
        head.WithTemperature(4).Predict(x.AsSpan(7 * d, d), p4, f);
        Assert.True(p4.Max() < p1.Max());
        Assert.Equal(Enumerable.Range(0, 5).OrderBy(i => p1[i]), Enumerable.Range(0, 5).OrderBy(i => p4[i]));
    }

    [Fact]
    public void Options_NonPositiveL2_Throws()
        => Assert.Throws<ArgumentOutOfRangeException>(() => new LearnedScoringOptions { L2 = 0 });
}
