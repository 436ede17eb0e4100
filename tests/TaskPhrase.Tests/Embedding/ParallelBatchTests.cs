using TaskPhrase.Onnx;

namespace TaskPhrase.Tests.Embedding;

/// <summary>
/// <see cref="OnnxEmbedderOptions.ParallelBatches"/>: batches run side by side on one session must give the same
/// vectors, in input order, as one batch after the other. ONNX Runtime sessions accept concurrent Run calls (documented
/// thread safety of InferenceSession.Run; common practice), and a batch's inputs do not depend on the schedule.
/// </summary>
[Collection(ModelCollection.Name)]
public sealed class ParallelBatchTests(ModelFixture fixture)
{
    // Mixed lengths (1 to ~30 tokens) so that a small batch size makes many batches of different widths.
    private static readonly string[] Texts = Enumerable.Range(0, 60)
        .Select(i => string.Join(' ', Enumerable.Repeat("water the basil on the sill", 1 + i % 6)) + $" {i}")
        .Concat(["a", "hall light", "could you bring my phone over from the charger please", "\U0001F600"])
        .ToArray();

    [Fact]
    public void EmbedMany_BatchesSideBySide_EqualOneAfterTheOther()
    {
        var sequentialOptions = new OnnxEmbedderOptions { IntraOpThreads = 1, BatchSize = 4 };
        var parallelOptions = new OnnxEmbedderOptions { IntraOpThreads = 1, BatchSize = 4, ParallelBatches = 3 };
        using var sequential = OnnxEmbedder.CreateDefault(sequentialOptions);
        using var parallel = OnnxEmbedder.CreateDefault(parallelOptions);
        var (a, ta) = sequential.EmbedMany(Texts);
        var (b, tb) = parallel.EmbedMany(Texts);
        Assert.Equal(ta, tb);
        for (int i = 0; i < Texts.Length; i++)
            Assert.True(a[i].AsSpan().SequenceEqual(b[i]), $"text {i} ('{Texts[i]}') differs between sequential and parallel batches");
        // And against the shared fixture (2 threads, one batch of 32 at a time): within float rounding.
        var (c, _) = fixture.Embedder.EmbedMany(Texts);
        for (int i = 0; i < Texts.Length; i++)
            for (int d = 0; d < c[i].Length; d++) Assert.Equal(c[i][d], b[i][d], 1e-5);
    }

    [Fact]
    public void EmbedMany_ParallelAndCancelled_Throws()
    {
        using var parallel = OnnxEmbedder.CreateDefault(new OnnxEmbedderOptions { IntraOpThreads = 1, BatchSize = 2, ParallelBatches = 2 });
        using var cts = new CancellationTokenSource();
        cts.Cancel();
        Assert.ThrowsAny<OperationCanceledException>(() => parallel.EmbedMany(Texts, cts.Token));
    }

    [Theory]
    [InlineData(1, 1, 1)]
    [InlineData(2, 2, 1)]
    [InlineData(3, 3, 1)]
    [InlineData(8, 4, 2)]
    [InlineData(64, 4, 16)]
    public void ForBatchWork_SplitsTheCpusBetweenBatchesAndThreads(int cpus, int batches, int threads)
    {
        var o = OnnxEmbedderOptions.ForBatchWork(cpus);
        Assert.Equal(batches, o.ParallelBatches);
        Assert.Equal(threads, o.IntraOpThreads);
        Assert.Equal(threads, o.QuantizedIntraOpThreads);
    }

    [Fact]
    public void Options_OutOfRange_AreRefused()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => OnnxEmbedderOptions.ForBatchWork(0));
        Assert.Throws<ArgumentOutOfRangeException>(() => new OnnxEmbedderOptions { ParallelBatches = 0 });
        Assert.Throws<ArgumentOutOfRangeException>(() => new OnnxEmbedderOptions { QuantizedParallelBatches = -1 });
    }
}
