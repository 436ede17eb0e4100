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
/// The mapped form (<c>model.mapped.onnx</c> + <c>model.mapped.data</c>): same embeddings bit for bit as model.onnx, the
/// same model identity (so indexes match either way), weights at aligned offsets in the side file (ONNX external data, as
/// the ONNX specification defines it: <c>location</c>, <c>offset</c>, <c>length</c>), and ignored — never trusted — when
/// stale or damaged.
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
        Assert.Equal(new FileInfo(prepared.Report.Path).Length + new FileInfo(prepared.Report.DataPath).Length, prepared.Report.Bytes);
        var record = JsonNode.Parse(File.ReadAllText(Path.Combine(prepared.Directory, "model.mapped.json")))!;
        // product.md, "Default model": the published SHA-256 of the bundled model.onnx.
        Assert.Equal("4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2", (string?)record["source_sha256"]);
        Assert.Empty(Directory.GetFiles(prepared.Directory, "*.tmp"));
        Assert.Empty(Directory.GetDirectories(prepared.Directory));

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
    public void Prepare_MovesEveryLargeWeightToAlignedOffsets_AndKeepsTheGraphSmall()
    {
        // all-MiniLM-L6-v2: 36 MatMul weights (6 layers × Q, K, V, attention output, intermediate, output) and the
        // word and position embedding tables are all far above the 16 KiB threshold.
        Assert.True(prepared.Report.ExternalTensors >= 38, $"{prepared.Report.ExternalTensors} tensors moved");
        Assert.True(new FileInfo(prepared.Report.Path).Length < 1 << 20, "the graph file should hold only the graph and small tensors");
        var graph = global::Onnx.ModelProto.Parser.ParseFrom(File.ReadAllBytes(prepared.Report.Path));
        var external = graph.Graph.Initializer.Where(t => t.DataLocation == global::Onnx.TensorProto.Types.DataLocation.External).ToList();
        Assert.Equal(prepared.Report.ExternalTensors, external.Count);
        long dataLength = new FileInfo(prepared.Report.DataPath).Length;
        foreach (var t in external)
        {
            var fields = t.ExternalData.ToDictionary(e => e.Key, e => e.Value);
            Assert.Equal("model.mapped.data", fields["location"]);
            long offset = long.Parse(fields["offset"], System.Globalization.CultureInfo.InvariantCulture);
            long length = long.Parse(fields["length"], System.Globalization.CultureInfo.InvariantCulture);
            Assert.Equal(0, offset % 65536);
            Assert.True(offset + length <= dataLength, $"{t.Name} runs past the end of the data file");
            Assert.Equal(4L * t.Dims.Aggregate(1L, (a, d) => a * d), length); // float32 weights
        }
    }

    [Fact]
    public void Prepare_RemovesTheEarlierOrtFormatFiles()
    {
        string dir = Copy();
        File.WriteAllText(Path.Combine(dir, "model.ort"), "old");
        File.WriteAllText(Path.Combine(dir, "model.ort.json"), "{}");
        OnnxEmbedder.PrepareOptimizedModel(dir);
        Assert.False(File.Exists(Path.Combine(dir, "model.ort")));
        Assert.False(File.Exists(Path.Combine(dir, "model.ort.json")));
        using var embedder = OnnxEmbedder.Create(dir);
        Assert.True(embedder.UsesOptimizedModel, embedder.OptimizedModelNote);
    }

    [Fact]
    public void Load_WithoutOptimizedFile_UsesModelOnnxAndSaysWhy()
    {
        using var embedder = OnnxEmbedder.CreateDefault();
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains("model.mapped.onnx", embedder.OptimizedModelNote);
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

    [Theory]
    [InlineData("model.mapped.data")]
    [InlineData("model.mapped.onnx")]
    public void Load_DamagedFile_FallsBackToModelOnnx_WithTheRightEmbeddings(string name)
    {
        string dir = Copy();
        string file = Path.Combine(dir, name);
        using (var stream = File.Open(file, FileMode.Open, FileAccess.ReadWrite))
        {
            // One byte in the middle: the graph may still load (a weight changes), so only the hash can tell.
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
    [InlineData("format", "99", "format 99")]
    [InlineData("source_sha256", "00ff", "00ff")]
    [InlineData("data_length", "12", "its record says 12")]
    [InlineData("graph_length", "12", "its record says 12")]
    public void Load_RecordThatDoesNotFit_IgnoresTheFiles(string key, string value, string named)
    {
        string dir = Copy();
        string recordPath = Path.Combine(dir, "model.mapped.json");
        var record = JsonNode.Parse(File.ReadAllText(recordPath))!.AsObject();
        record[key] = key is "format" or "data_length" or "graph_length" ? JsonValue.Create(long.Parse(value, System.Globalization.CultureInfo.InvariantCulture)) : JsonValue.Create(value);
        File.WriteAllText(recordPath, record.ToJsonString());
        using var embedder = OnnxEmbedder.Create(dir);
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains(named, embedder.OptimizedModelNote);
    }

    [Fact]
    public void Load_UnreadableRecord_IgnoresTheFile()
    {
        string dir = Copy();
        File.WriteAllText(Path.Combine(dir, "model.mapped.json"), "{ not json");
        using var embedder = OnnxEmbedder.Create(dir);
        Assert.False(embedder.UsesOptimizedModel);
        Assert.Contains("unreadable", embedder.OptimizedModelNote);
    }
}
