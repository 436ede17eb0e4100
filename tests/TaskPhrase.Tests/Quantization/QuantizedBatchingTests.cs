using System.Numerics.Tensors;
using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Quantization;

/// <summary>
/// Batched int8 embeddings (<see cref="OnnxEmbedder.EmbedMany"/>) against one-at-a-time ones and against fp32, over
/// the held-out phrases and 600 CLINC150 validation queries (Larson et al., 2019; every fifth row, so all intents
/// and lengths 3 to about 30 tokens appear; 701 distinct texts, 25 token lengths, with the 101 held-out phrases
/// before issue 12; 200 held-out phrases since). With batches padded to their
/// longest member this set measured min cosine 0.9875 batched int8 to fp32 (two-pass model), below the 0.99 gate;
/// with batches of one token length 0.9926 (two-pass) and 0.9916 (per-token wide inputs; single int8 0.9913,
/// batched to single int8 0.9943). With fp32 outlier channels and the 200 held-out phrases (800 texts, 29 lengths):
/// batched 0.9922, single 0.9932, batched to single 0.9915.
/// </summary>
[Collection(QuantizedModelCollection.Name)]
[Trait("tier", "slow")]
public sealed class QuantizedBatchingTests(QuantizedModelFixture fixture, ITestOutputHelper output)
{
    private static readonly Lazy<List<string>> Phrases = new(() =>
        QuantizationPhrases.HeldOut.Concat(Clinc150.Split("val").Where((_, i) => i % 5 == 0).Select(r => r.Text))
            .Distinct(StringComparer.Ordinal).ToList());

    private OnnxEmbedder Int8 => fixture.Int8 ?? throw new InvalidOperationException(fixture.Result.Failure);

    private static float[][] OneAtATime(OnnxEmbedder embedder, IReadOnlyList<string> texts) =>
        texts.Select(t => { var v = new float[embedder.Model.Dimensions]; embedder.Embed(t, v); return v; }).ToArray();

    private int TokenCount(string text)
    {
        var ids = new long[Int8.Model.MaxTokens];
        var mask = new long[Int8.Model.MaxTokens];
        return Int8.Tokenizer.Encode(text, ids, mask).Count;
    }

    [Fact]
    public void EmbedMany_Int8_StaysWithinTheGateOfSingleAndFp32()
    {
        var phrases = Phrases.Value;
        var lengths = phrases.Select(TokenCount).Distinct().Count();
        Assert.True(lengths >= 15, $"{lengths} distinct token lengths: the set must mix lengths to exercise batching");
        var (batched, _) = Int8.EmbedMany(phrases);
        var single = OneAtATime(Int8, phrases);
        var fp32 = OneAtATime(fixture.Fp32, phrases);

        var toSingle = phrases.Select((_, i) => (double)TensorPrimitives.CosineSimilarity(batched[i], single[i])).ToArray();
        var toFp32 = phrases.Select((_, i) => (double)TensorPrimitives.CosineSimilarity(batched[i], fp32[i])).ToArray();
        var singleToFp32 = phrases.Select((_, i) => (double)TensorPrimitives.CosineSimilarity(single[i], fp32[i])).ToArray();
        output.WriteLine($"{phrases.Count} phrases, {lengths} lengths: batched int8 vs single int8 min {toSingle.Min():0.00000}; batched int8 vs fp32 min {toFp32.Min():0.00000}; single int8 vs fp32 min {singleToFp32.Min():0.00000}");

        Assert.True(toSingle.Min() >= QuantizationGates.MinCosine, $"batched vs single int8 min cosine {toSingle.Min():0.00000}");
        Assert.True(toFp32.Min() >= QuantizationGates.MinCosine, $"batched int8 vs fp32 min cosine {toFp32.Min():0.00000}");
        Assert.True(singleToFp32.Min() >= QuantizationGates.MinCosine, $"single int8 vs fp32 min cosine {singleToFp32.Min():0.00000}");
    }

    [Fact]
    public void EmbedMany_Int8_BatchesSideBySide_EqualOneAfterTheOther()
    {
        // Integer kernels are exact, so the schedule of the batches may not change a single bit.
        var phrases = Phrases.Value;
        using var sequential = OnnxEmbedder.Create(fixture.ModelDirectory, new OnnxEmbedderOptions { QuantizedIntraOpThreads = 1, QuantizedBatchSize = 8 });
        using var parallel = OnnxEmbedder.Create(fixture.ModelDirectory, new OnnxEmbedderOptions { QuantizedIntraOpThreads = 1, QuantizedBatchSize = 8, QuantizedParallelBatches = 2, ParallelBatches = 1 });
        var (a, _) = sequential.EmbedMany(phrases);
        var (b, _) = parallel.EmbedMany(phrases);
        for (int i = 0; i < phrases.Count; i++)
            Assert.True(a[i].AsSpan().SequenceEqual(b[i]), $"'{phrases[i]}' differs between sequential and parallel int8 batches");
    }

    [Fact]
    public void EmbedMany_Int8_BatchesOnlyTextsOfOneLength()
    {
        // Observable consequence: a text's batched vector is the same whether the other texts of its length are
        // embedded alone or mixed with texts of other lengths (no padding rows join its batch).
        var phrases = Phrases.Value;
        var counts = phrases.Select(TokenCount).ToArray();
        var (mixed, _) = Int8.EmbedMany(phrases);
        int compared = 0;
        foreach (var group in Enumerable.Range(0, phrases.Count).GroupBy(i => counts[i]))
        {
            var members = group.ToArray();
            if (members.Length < 2 || members.Length > new OnnxEmbedderOptions().QuantizedBatchSize) continue;
            var (alone, _) = Int8.EmbedMany(members.Select(i => phrases[i]).ToList());
            for (int k = 0; k < members.Length; k++)
            {
                float distance = TensorPrimitives.Distance(alone[k], mixed[members[k]]);
                Assert.True(distance <= 1e-5f, $"'{phrases[members[k]]}' ({counts[members[k]]} tokens): distance {distance} between its length-only batch and the mixed call");
                compared++;
            }
        }
        Assert.True(compared >= 50, $"only {compared} texts compared");
    }

    [Fact]
    public void EmbedMany_Fp32_StillMatchesSingleAcrossPaddedBatches()
    {
        // fp32 keeps full padded batches (their results equal one-at-a-time results within float rounding).
        var phrases = Phrases.Value.Take(200).ToList();
        var (batched, _) = fixture.Fp32.EmbedMany(phrases);
        var single = OneAtATime(fixture.Fp32, phrases);
        for (int i = 0; i < phrases.Count; i++)
            Assert.True(TensorPrimitives.Distance(batched[i], single[i]) <= 1e-4f, phrases[i]);
    }
}
