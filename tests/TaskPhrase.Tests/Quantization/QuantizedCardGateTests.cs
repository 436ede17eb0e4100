using System.Text.Json.Nodes;
using TaskPhrase.Onnx;
using TaskPhrase.Registry;
using TaskPhrase.Tests.Registry;

namespace TaskPhrase.Tests.Quantization;

[Collection(QuantizedModelCollection.Name)]
[Trait("tier", "slow")]
public sealed class QuantizedCardGateTests(QuantizedModelFixture fixture)
{
    /// <summary>Copies the int8 directory and applies an edit to its card's JSON.</summary>
    private string CopyWithCard(string name, Action<JsonObject> edit)
    {
        Assert.True(fixture.Result.Passed, fixture.Result.Failure);
        string dir = Path.Combine(fixture.Root, name);
        Directory.CreateDirectory(dir);
        foreach (var file in new[] { "model.onnx", "vocab.txt" })
            File.Copy(Path.Combine(fixture.ModelDirectory, file), Path.Combine(dir, file), overwrite: true);
        var card = JsonNode.Parse(File.ReadAllText(Path.Combine(fixture.ModelDirectory, "model.json")))!.AsObject();
        edit(card);
        File.WriteAllText(Path.Combine(dir, "model.json"), card.ToJsonString());
        return dir;
    }

    [Fact]
    public void Create_CardWithFailingMinCosine_IsRefused()
    {
        string dir = CopyWithCard("low-cosine", c => c["quantization"]!["quality"]!["min_cosine"] = 0.93);
        var ex = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
        Assert.Contains("min cosine", ex.Message, StringComparison.Ordinal);
        Assert.Contains(Path.Combine(dir, "model.json"), ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Create_CardWithoutQualityFigures_IsRefused()
    {
        string dir = CopyWithCard("no-quality", c => c["quantization"]!.AsObject().Remove("quality"));
        var ex = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
        Assert.Contains("quality", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Create_CardWithDriftedMatrix_IsRefused()
    {
        // 0.6460 is 0.02 from the published 0.6660 (sentence-transformers Quickstart) and from the recorded fp32 value.
        string dir = CopyWithCard("drifted-matrix", c => c["quantization"]!["quality"]!["similarity_matrix"]![0] = 0.6460);
        var ex = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
        Assert.Contains("Quickstart similarity 1", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Create_CardWithClincAccuracyTwoPointsOffFp32_IsRefused()
    {
        Assert.NotNull(fixture.Result.Quantization.Quality!.Clinc150);
        string dir = CopyWithCard("clinc-drift", c =>
        {
            var clinc = c["quantization"]!["quality"]!["clinc150"]!;
            clinc["int8"]!["in_scope_accuracy"] = (double)clinc["fp32"]!["in_scope_accuracy"]! - 0.02;
        });
        var ex = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
        Assert.Contains("CLINC150 in-scope accuracy", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Create_CardWithClincWithinOnePoint_Loads()
    {
        // 0.005 off fp32 is inside the 1-point gate: the edited card still loads (its model file is unchanged).
        string dir = CopyWithCard("clinc-close", c =>
        {
            var clinc = c["quantization"]!["quality"]!["clinc150"]!;
            clinc["int8"]!["false_accept"] = (double)clinc["fp32"]!["false_accept"]! + 0.005;
        });
        using var embedder = OnnxEmbedder.Create(dir);
        Assert.Equal("all-minilm-l6-v2-int8", embedder.Model.Id);
    }

    [Fact]
    public void Create_CardWithoutModelHash_IsRefused()
    {
        string dir = CopyWithCard("no-hash", c => c.Remove("model_sha256"));
        var ex = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
        Assert.Contains("model_sha256", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Create_CardIntactButModelFileSwapped_IsRefusedByHash()
    {
        string dir = CopyWithCard("swapped", _ => { });
        File.Copy(Path.Combine(BuiltInModels.Locate(), "model.onnx"), Path.Combine(dir, "model.onnx"), overwrite: true);
        var ex = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
        Assert.Contains("SHA-256", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void IndexLoad_IndexBuiltWithFp32_IsRefusedForInt8()
    {
        var int8 = fixture.Int8 ?? throw new InvalidOperationException(fixture.Result.Failure);
        var registry = RegistryLoader.Load(RegistryFixtures.Valid("small.yaml"));
        var phrases = registry.Tasks.SelectMany(t => t.Phrases).ToList();
        var (vectors, _) = fixture.Fp32.EmbedMany(phrases);
        string path = Path.Combine(fixture.Root, "fp32.tpidx");
        TaskIndex.Write(path, registry, fixture.Fp32.Model, vectors.SelectMany(v => v).ToArray());

        Assert.Equal(fixture.Fp32.Model, TaskIndex.Load(path, fixture.Fp32.Model).Model);
        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path, int8.Model));
        Assert.Equal(IndexErrorKind.ModelMismatch, ex.Kind);
        Assert.Contains("all-minilm-l6-v2-int8", ex.Message, StringComparison.Ordinal);
    }
}
