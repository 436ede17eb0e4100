using System.Numerics.Tensors;
using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Quantization;

/// <summary>
/// The 0.99 cosine gate on outside text: 3,000 CLINC150 training queries (Larson et al., 2019, "An Evaluation Dataset
/// for Intent Classification and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0; every fifth row of the train
/// split), none of them in the quantiser's own phrase sets by construction. The int8 embeddings, made one at a time
/// and in batches, must each stay at cosine ≥ 0.99 to fp32's. Issue 12: the per-token method without fp32 outlier
/// channels measured single min 0.9797 ("thank you") and batched min 0.9842 here, so this test fails on that model.
/// </summary>
[Collection(QuantizedModelCollection.Name)]
[Trait("tier", "slow")]
public sealed class QuantizedClincTailTests(QuantizedModelFixture fixture, ITestOutputHelper output)
{
    [Fact]
    public void Int8_ClincTrainQueries_SingleAndBatched_StayAtTheCosineGate()
    {
        var int8 = fixture.Int8 ?? throw new InvalidOperationException(fixture.Result.Failure);
        var queries = QuantizationTailMeasurement.TrainQueries();
        Assert.Equal(3000, queries.Count);
        var (reference, _) = fixture.Fp32.EmbedMany(queries);
        var (batched, _) = int8.EmbedMany(queries);
        var vector = new float[int8.Model.Dimensions];
        var single = new double[queries.Count];
        var many = new double[queries.Count];
        for (int i = 0; i < queries.Count; i++)
        {
            int8.Embed(queries[i], vector);
            single[i] = TensorPrimitives.CosineSimilarity(reference[i], vector);
            many[i] = TensorPrimitives.CosineSimilarity(reference[i], batched[i]);
        }
        int worstSingle = Array.IndexOf(single, single.Min()), worstBatched = Array.IndexOf(many, many.Min());
        output.WriteLine($"{queries.Count} CLINC150 train queries: single min {single.Min():0.00000} ('{queries[worstSingle]}') mean {single.Average():0.00000}; batched min {many.Min():0.00000} ('{queries[worstBatched]}') mean {many.Average():0.00000}");

        Assert.True(single.Min() >= QuantizationGates.MinCosine, $"single int8 vs fp32 min cosine {single.Min():0.00000} on '{queries[worstSingle]}'");
        Assert.True(many.Min() >= QuantizationGates.MinCosine, $"batched int8 vs fp32 min cosine {many.Min():0.00000} on '{queries[worstBatched]}'");
    }
}
