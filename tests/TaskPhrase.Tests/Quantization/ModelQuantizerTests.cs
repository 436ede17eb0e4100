using System.Numerics.Tensors;
using System.Security.Cryptography;
using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Tests.Quantization;

[Collection(QuantizedModelCollection.Name)]
[Trait("tier", "slow")]
public sealed class ModelQuantizerTests(QuantizedModelFixture fixture)
{
    [Fact]
    public void Quantize_BuiltInMiniLm_PassesGatesAndWritesDirectory()
    {
        Assert.True(fixture.Result.Passed, fixture.Result.Failure);
        foreach (var name in new[] { "model.onnx", "vocab.txt", "model.json" })
            Assert.True(File.Exists(Path.Combine(fixture.ModelDirectory, name)), name);
        var q = fixture.Result.Quantization;
        Assert.Equal(ModelQuantizer.Method, q.Method);
        Assert.Equal(0.7, q.Alpha);
        // all-MiniLM-L6-v2 has 6 layers × (Q, K, V, attention output, intermediate, output) MatMuls with constant weights.
        Assert.Equal(36, q.QuantizedMatMuls);
        Assert.NotNull(q.Quality);
        Assert.InRange(q.Quality!.MinCosine, QuantizationGates.MinCosine, 1.0001);
    }

    [Fact]
    public void Quantize_Graph_QuantisesTheWideInputsPerTokenAndTheOthersPerTensor()
    {
        // Each wide group also keeps its outlier input channels in fp32: one Gather, one fp32 MatMul and one Add more
        // than the source graph per layer (the 36 weight MatMuls become MatMulInteger).
        // all-MiniLM-L6-v2: 6 layers, each with three 384-channel activation groups (Q/K/V input, attention output
        // input, intermediate input: DynamicQuantizeLinear per tensor) and one 1,536-channel group (the down-projection
        // fed by GELU: per-token QuantizeLinear along the rows of a [-1, 1536] reshape); 36 MatMulInteger in all.
        var graph = fixture.Graph ?? throw new InvalidOperationException(fixture.Result.Failure);
        var ops = graph.OpCounts;
        Assert.Equal(36, ops.GetValueOrDefault("MatMulInteger"));
        Assert.Equal(18, ops.GetValueOrDefault("DynamicQuantizeLinear"));
        Assert.Equal(6, ops.GetValueOrDefault("QuantizeLinear"));
        Assert.Equal(0, ops.GetValueOrDefault("DequantizeLinear"));
        Assert.Empty(graph.NonStandard);
        var source = GraphSummary.Read(Path.Combine(BuiltInModels.Locate(BuiltInModels.MiniLmL6V2), "model.onnx")).OpCounts;
        Assert.Equal(source.GetValueOrDefault("MatMul") - 36 + 6, ops.GetValueOrDefault("MatMul"));
        Assert.Equal(source.GetValueOrDefault("Gather") + 6, ops.GetValueOrDefault("Gather"));
        Assert.Equal(source.GetValueOrDefault("Add") + 6, ops.GetValueOrDefault("Add"));
        Assert.All(graph.QuantizeLinear, q =>
        {
            Assert.Equal(0, q.Axis);
            Assert.Equal(new long[] { -1, 1536 }, q.InputShape);
        });
    }

    [Fact]
    public void Quantize_Card_RecordsProvenanceAndFigures()
    {
        var card = ModelCard.Load(Path.Combine(fixture.ModelDirectory, "model.json"));
        Assert.Equal("all-minilm-l6-v2-int8", card.Id);
        Assert.Equal(("mean", 256, 384), (card.Pooling, card.MaxTokens, card.Dimensions));
        // Published SHA-256 of the fp32 model (product.md, "Default model").
        Assert.Equal("4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2", card.Quantization!.SourceModelSha256);
        Assert.Equal(QuantizationPhrases.Sha256(QuantizationPhrases.Calibration), card.Quantization.CalibrationSetSha256);
        using (var s = File.OpenRead(Path.Combine(fixture.ModelDirectory, "model.onnx")))
            Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(s)), card.ModelSha256);
        Assert.Equal(File.ReadAllBytes(Path.Combine(BuiltInModels.Locate(), "vocab.txt")), File.ReadAllBytes(Path.Combine(fixture.ModelDirectory, "vocab.txt")));
        var written = card.Quantization.Quality!;
        var measured = fixture.Result.Quantization.Quality!;
        Assert.Equal((measured.MinCosine, measured.MeanCosine, measured.HeldOutPhrases), (written.MinCosine, written.MeanCosine, written.HeldOutPhrases));
        Assert.Equal(measured.SimilarityMatrix!, written.SimilarityMatrix!);
        Assert.Equal(QuantizationPhrases.Sha256(QuantizationPhrases.HeldOut), written.HeldOutSetSha256);
    }

    [Fact]
    public void Int8_QuickstartSentences_ReproducePublishedSimilaritiesWithinOneHundredth()
    {
        // Published values: sentence-transformers documentation, Quickstart ("Sentence Transformer"): "The weather is
        // lovely today." to "It's so sunny outside!" = 0.6660 and to "He drove to the stadium." = 0.1046; the last two 0.1411.
        var int8 = fixture.Int8 ?? throw new InvalidOperationException(fixture.Result.Failure);
        var (v, _) = int8.EmbedMany(QuantizationGates.QuickstartSentences);
        Assert.Equal(0.6660, TensorPrimitives.CosineSimilarity(v[0], v[1]), 0.01);
        Assert.Equal(0.1046, TensorPrimitives.CosineSimilarity(v[0], v[2]), 0.01);
        Assert.Equal(0.1411, TensorPrimitives.CosineSimilarity(v[1], v[2]), 0.01);
    }

    [Fact]
    public void Int8_HeldOutPhrases_StayCloseToFp32AsRecorded()
    {
        // Recomputed here independently of the quantiser's own measurement, from the two loaded embedders.
        var int8 = fixture.Int8 ?? throw new InvalidOperationException(fixture.Result.Failure);
        // The recorded figures cover int8 embeddings made one at a time and in batches.
        var (a, _) = fixture.Fp32.EmbedMany(QuantizationPhrases.HeldOut);
        var (batched, _) = int8.EmbedMany(QuantizationPhrases.HeldOut);
        var single = QuantizationPhrases.HeldOut.Select(p => { var v = new float[int8.Model.Dimensions]; int8.Embed(p, v); return v; }).ToArray();
        var batchedCosines = a.Zip(batched, (x, y) => (double)TensorPrimitives.CosineSimilarity(x, y)).ToList();
        var singleCosines = a.Zip(single, (x, y) => (double)TensorPrimitives.CosineSimilarity(x, y)).ToList();
        var cosines = singleCosines.Concat(batchedCosines).ToList();
        Assert.True(cosines.Min() >= QuantizationGates.MinCosine, $"min cosine {cosines.Min():0.0000}");
        var recorded = fixture.Result.Quantization.Quality!;
        Assert.Equal(recorded.MinCosine, cosines.Min(), 1e-4);
        Assert.Equal(recorded.MeanCosine, cosines.Average(), 1e-4);
        Assert.Equal(recorded.SingleMinCosine!.Value, singleCosines.Min(), 1e-4);
        Assert.Equal(recorded.BatchedMinCosine!.Value, batchedCosines.Min(), 1e-4);
        // Quantisation must change the vectors at all (else the test would pass on a copied fp32 model).
        Assert.True(cosines.Max() < 0.999999, $"max cosine {cosines.Max():0.0000000}");
    }

    [Fact]
    public void Int8_Model_HasDifferentIdentityFromFp32()
    {
        var int8 = fixture.Int8 ?? throw new InvalidOperationException(fixture.Result.Failure);
        Assert.Equal("all-minilm-l6-v2-int8", int8.Model.Id);
        Assert.NotEqual(fixture.Fp32.Model.Sha256, int8.Model.Sha256);
        Assert.Equal(fixture.Fp32.Model.Dimensions, int8.Model.Dimensions);
    }

    [Fact]
    public void PhraseSets_AreDisjointFromEachOtherAndFromTheExampleRegistryAndProbes()
    {
        var calibration = QuantizationPhrases.Calibration.ToHashSet(StringComparer.OrdinalIgnoreCase);
        Assert.True(calibration.Count >= 100, $"{calibration.Count} calibration phrases");
        Assert.True(QuantizationPhrases.HeldOut.Count >= 100, $"{QuantizationPhrases.HeldOut.Count} held-out phrases");
        Assert.Equal([], QuantizationPhrases.HeldOut.Where(calibration.Contains).ToArray());
        var registry = TaskPhrase.Registry.RegistryLoader.Load(Path.Combine(AppContext.BaseDirectory, "examples", "harbor-street", "registry.yaml"));
        var approved = registry.Tasks.SelectMany(t => t.Phrases).ToHashSet(StringComparer.OrdinalIgnoreCase);
        foreach (var probes in new[] { "probes.csv", "probes-holdout.csv" })
            foreach (var line in File.ReadLines(Path.Combine(AppContext.BaseDirectory, "examples", "harbor-street", probes)).Skip(1))
                approved.Add(line.StartsWith('"') ? line[1..line.IndexOf('"', 1)] : line.Split(',')[0]);
        Assert.True(approved.Count > 300, $"{approved.Count} registry phrases and probes read");
        Assert.Equal([], QuantizationPhrases.Calibration.Concat(QuantizationPhrases.HeldOut).Where(approved.Contains).ToArray());
    }

    [Fact]
    public void Quantize_SecondRun_IsByteIdentical()
    {
        Assert.True(fixture.Result.Passed, fixture.Result.Failure);
        string again = Path.Combine(fixture.Root, "again");
        // Same options as the fixture (CLINC150 gate included), so the card must match too.
        var second = ModelQuantizer.Quantize(BuiltInModels.MiniLmL6V2, again, new QuantizationOptions { Clinc150Path = TestPaths.Clinc150 });
        Assert.True(second.Passed, second.Failure);
        foreach (var name in new[] { "model.onnx", "vocab.txt", "model.json" })
            Assert.Equal(SHA256.HashData(File.ReadAllBytes(Path.Combine(fixture.ModelDirectory, name))), SHA256.HashData(File.ReadAllBytes(Path.Combine(again, name))));
    }
}
