using System.Text.Json.Nodes;
using TaskPhrase.Onnx;

namespace TaskPhrase.Tests.Embedding;

/// <summary>
/// One pre-optimised copy of the default model (written once for the class by <see cref="OnnxEmbedder.PrepareOptimizedModel"/>),
/// copied per test so each can damage its own.
/// </summary>
public sealed class PreparedModelFixture : IDisposable
{
    public PreparedModelFixture()
    {
        Directory = System.IO.Directory.CreateTempSubdirectory("tp-prepared-").FullName;
        string source = BuiltInModels.Locate();
        foreach (var name in new[] { "model.onnx", "vocab.txt", "model.json" })
            File.Copy(Path.Combine(source, name), Path.Combine(Directory, name));
        Report = OnnxEmbedder.PrepareOptimizedModel(Directory);
    }

    public string Directory { get; }

    public OptimizedModelReport Report { get; }

    /// <summary>A fresh copy of the prepared directory (model.onnx keeps its write time, so the record still fits).</summary>
    public string Copy()
    {
        string dir = System.IO.Directory.CreateTempSubdirectory("tp-prepared-copy-").FullName;
        foreach (var file in System.IO.Directory.GetFiles(Directory))
        {
            string target = Path.Combine(dir, Path.GetFileName(file));
            File.Copy(file, target);
            File.SetLastWriteTimeUtc(target, File.GetLastWriteTimeUtc(file));
        }
        return dir;
    }

    public void Dispose() => System.IO.Directory.Delete(Directory, recursive: true);
}

/// <summary>
/// The pre-optimised model file (<c>model.ort</c>): same embeddings bit for bit as model.onnx, the same model identity
/// (so indexes match either way), and ignored — never trusted — when stale, damaged, or made for another runtime or CPU.
/// </summary>
[Collection(ModelCollection.Name)]
[Trait("tier", "slow")]
public sealed class OptimizedModelTests(ModelFixture model, PreparedModelFixture prepared) : IClassFixture<PreparedModelFixture>, IDisposable
{
    private readonly List<string> _copies = [];

    public void Dispose()
    {
        foreach (var dir in _copies) Directory.Delete(dir, recursive: true);
    }

    private string Copy()
    {
        string dir = prepared.Copy();
        _copies.Add(dir);
        return dir;
    }

    // Queries nobody in the project wrote: the first 300 of the CLINC150 validation split (Larson et al., 2019).
    private static readonly string[] Queries = Clinc150.Split("val").Take(300).Select(q => q.Text).ToArray();

    private void AssertSameEmbeddingsAsSource(OnnxEmbedder embedder)
    {
        var expected = new float[384];
        var actual = new float[384];
        foreach (var q in Queries)
        {
            model.Embedder.Embed(q, expected);
            embedder.Embed(q, actual);
            Assert.True(expected.AsSpan().SequenceEqual(actual), $"embedding of '{q}' differs");
        }
    }

    [Fact]
    public void Prepare_WritesFileAndRecord_ThatLoadsWithTheSourceIdentityAndBitIdenticalEmbeddings()
    {
        Assert.True(File.Exists(prepared.Report.Path));
        Assert.Equal(new FileInfo(prepared.Report.Path).Length, prepared.Report.Bytes);
        var record = JsonNode.Parse(File.ReadAllText(Path.Combine(prepared.Directory, "model.ort.json")))!;
        // product.md, "Default model": the published SHA-256 of the bundled model.onnx.
        Assert.Equal("4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2", (string?)record["source_sha256"]);
        Assert.Empty(Directory.GetFiles(prepared.Directory, "*.tmp"));

        using var embedder = OnnxEmbedder.Create(Copy());
        Assert.True(embedder.UsesOptimizedModel, embedder.OptimizedModelNote);
        Assert.Equal(model.Embedder.Model, embedder.Model);
        AssertSameEmbeddingsAsSource(embedder);
        var (batched, _) = embedder.EmbedMany(Queries);
        var (reference, _) = model.Embedder.EmbedMany(Queries);
        for (int i = 0; i < Queries.Length; i++)
            Assert.True(reference[i].AsSpan().SequenceEqual(batched[i]), $"batched embedding of '{Queries[i]}' differs");
    }

    [Fact]
    public void Load_WithoutOptimizedFile_UsesModelOnnxAndSaysWhy()
    {
        using var embedder = OnnxEmbedder.CreateDefault();
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains("model.ort", embedder.OptimizedModelNote);
    }

    [Fact]
    public void Load_TurnedOff_UsesModelOnnx()
    {
        using var embedder = OnnxEmbedder.Create(Copy(), new OnnxEmbedderOptions { UseOptimizedModel = false });
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains("UseOptimizedModel", embedder.OptimizedModelNote);
    }

    [Fact]
    public void Load_SourceChangedAfterPrepare_IgnoresTheFile()
    {
        string dir = Copy();
        File.SetLastWriteTimeUtc(Path.Combine(dir, "model.onnx"), DateTime.UtcNow.AddMinutes(1));
        using var embedder = OnnxEmbedder.Create(dir);
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains("changed", embedder.OptimizedModelNote);
    }

    [Fact]
    public void Load_DamagedFile_FallsBackToModelOnnx_WithTheRightEmbeddings()
    {
        string dir = Copy();
        string file = Path.Combine(dir, "model.ort");
        using (var stream = File.Open(file, FileMode.Open, FileAccess.ReadWrite))
        {
            // One byte in the middle of the weights: the graph may still load, so only the hash can tell.
            stream.Position = stream.Length / 2;
            int b = stream.ReadByte();
            stream.Position = stream.Length / 2;
            stream.WriteByte((byte)(b ^ 0x5A));
        }
        using var embedder = OnnxEmbedder.Create(dir);
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains("SHA-256", embedder.OptimizedModelNote);
        Assert.Equal(model.Embedder.Model, embedder.Model);
        AssertSameEmbeddingsAsSource(embedder);
    }

    [Theory]
    [InlineData("onnx_runtime", "0.0.1", "ONNX Runtime 0.0.1")]
    [InlineData("cpu", "x64+sse2", "x64+sse2")]
    [InlineData("session", "level=basic", "level=basic")]
    [InlineData("format", "99", "format 99")]
    public void Load_RecordForAnotherRuntimeCpuOrSetting_IgnoresTheFile(string key, string value, string named)
    {
        string dir = Copy();
        string recordPath = Path.Combine(dir, "model.ort.json");
        var record = JsonNode.Parse(File.ReadAllText(recordPath))!.AsObject();
        record[key] = key == "format" ? JsonValue.Create(int.Parse(value, System.Globalization.CultureInfo.InvariantCulture)) : JsonValue.Create(value);
        File.WriteAllText(recordPath, record.ToJsonString());
        using var embedder = OnnxEmbedder.Create(dir);
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains(named, embedder.OptimizedModelNote);
    }

    [Fact]
    public void Load_UnreadableRecord_IgnoresTheFile()
    {
        string dir = Copy();
        File.WriteAllText(Path.Combine(dir, "model.ort.json"), "{ not json");
        using var embedder = OnnxEmbedder.Create(dir);
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains("unreadable", embedder.OptimizedModelNote);
    }
}
