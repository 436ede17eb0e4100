using CsCheck;
using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Tests.Resolution.Scoring;

public class KernelsTests
{
    [Fact]
    public void Dot_RandomVectors_MatchesDoubleSum()
    {
        // Reference: the plain double-precision sum (common practice); float rounding allows a small relative error.
        Gen.Int[0, 100].SelectMany(n => Gen.Float[-1, 1].Array[n].SelectMany(x => Gen.Float[-1, 1].Array[n].Select(y => (x, y)))).Sample(t =>
        {
            var (x, y) = t;
            double expected = 0, scale = 0;
            for (int i = 0; i < x.Length; i++) { expected += (double)x[i] * y[i]; scale += Math.Abs((double)x[i] * y[i]); }
            Assert.True(Math.Abs(Kernels.Dot(x, y) - expected) <= 1e-6 * (1 + scale), $"n = {x.Length}");
        }, iter: 300);
    }

    [Fact]
    public void Dot4_AnyRowCount_BitIdenticalToDot()
    {
        Gen.Int[1, 70].SelectMany(n => Gen.Int[1, 4].SelectMany(count => Gen.Float[-3, 3].Array[n * (count + 1)].Select(v => (n, count, v)))).Sample(t =>
        {
            var (n, count, v) = t;
            var x = v.AsSpan(0, n).ToArray();
            var rows = v.AsSpan(n).ToArray();
            var result = new float[4];
            Kernels.Dot4(x, rows, 0, count, result);
            for (int r = 0; r < count; r++)
                Assert.Equal(BitConverter.SingleToInt32Bits(Kernels.Dot(x, rows.AsSpan(r * n, n))), BitConverter.SingleToInt32Bits(result[r]));
        }, iter: 300);
    }

    [Fact]
    public void Dot_AnyLength_BitIdenticalToTheSixteenLaneDefinition()
    {
        // The documented order, written out in scalar float: lane j sums x[i]·y[i] for i = j, j + 16, … over the whole
        // blocks of 16, the lanes are added in order 0..15, then the tail elements in index order. Any vector width
        // must give exactly this.
        Gen.Int[0, 90].SelectMany(n => Gen.Float[-3, 3].Array[2 * n].Select(v => (n, v))).Sample(t =>
        {
            var (n, v) = t;
            var x = v.AsSpan(0, n);
            var y = v.AsSpan(n, n);
            var lanes = new float[16];
            int blocks = n / 16 * 16;
            for (int i = 0; i < blocks; i++) lanes[i % 16] += x[i] * y[i];
            float expected = 0f;
            foreach (float lane in lanes) expected += lane;
            for (int i = blocks; i < n; i++) expected += x[i] * y[i];
            Assert.Equal(BitConverter.SingleToInt32Bits(expected), BitConverter.SingleToInt32Bits(Kernels.Dot(x, y)));
        }, iter: 300);
    }

    [Fact]
    public void DotSameBlocks4_RowsOfOneBlockCount_BitIdenticalToDotOfEachPrefix()
    {
        // Four rows of lengths 16·b + t (t from 0 to 15 each), as consecutive rows of a triangular matrix have.
        Gen.Int[0, 5].SelectMany(b => Gen.Int[0, 15].Array[4].SelectMany(t => Gen.Float[-3, 3].Array[16 * b + 16 + 4 * (16 * b + 16)].Select(v => (b, t, v)))).Sample(c =>
        {
            var (b, t, v) = c;
            int width = 16 * b + 16;
            var x = v.AsSpan(0, width).ToArray();
            var rows = Enumerable.Range(0, 4).Select(r => v.AsSpan(width * (r + 1), 16 * b + t[r]).ToArray()).ToArray();
            var result = new float[4];
            Kernels.DotSameBlocks4(x, rows[0], rows[1], rows[2], rows[3], result);
            for (int r = 0; r < 4; r++)
                Assert.Equal(BitConverter.SingleToInt32Bits(Kernels.Dot(rows[r], x.AsSpan(0, rows[r].Length))), BitConverter.SingleToInt32Bits(result[r]));
        }, iter: 300);
    }

    [Fact]
    public void DotSameBlocks4_DifferentBlockCounts_Throws()
        => Assert.Throws<ArgumentException>(() => Kernels.DotSameBlocks4(new float[40], new float[15], new float[16], new float[15], new float[15], new float[4]));

    [Fact]
    public void AddScaled_Floats_EqualsElementwiseMultiplyThenAdd()
    {
        Gen.Float[-2, 2].Array[0, 50].Select(x => x).Sample(x =>
        {
            var y = x.Select((v, i) => v * 0.5f + i).ToArray();
            var expected = y.Select((v, i) => v + 1.7f * x[i]).ToArray();
            Kernels.AddScaled(x, 1.7f, y);
            Assert.Equal(expected, y);
        }, iter: 100);
    }

    [Fact]
    public void Dot_DifferentLengths_Throws()
        => Assert.Throws<ArgumentException>(() => Kernels.Dot(new float[3], new float[4]));
}
