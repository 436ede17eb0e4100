using System.Text.Json.Nodes;
using TaskPhrase.Onnx;

namespace TaskPhrase.Cli.Tests;

/// <summary><c>taskphrase prepare</c> in-process: writes the mapped form and its record, which the next load uses; user errors exit 2.</summary>
[Collection(CliCollection.Name)]
[Trait("tier", "slow")]
public sealed class PrepareCommandTests(CliFixture cli) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-cli-prepare-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    [Fact]
    public void Prepare_Json_WritesTheFileThatTheNextLoadUses()
    {
        string source = BuiltInModels.Locate();
        foreach (var name in new[] { "model.onnx", "vocab.txt", "model.json" })
            File.Copy(Path.Combine(source, name), Path.Combine(_dir, name));

        var (exit, output, error) = cli.Run("prepare", "--model", _dir, "--json");

        Assert.True(exit == 0, error);
        var json = JsonNode.Parse(output)!;
        Assert.Equal(Path.Combine(_dir, "model.mapped.onnx"), (string?)json["path"]);
        Assert.Equal(Path.Combine(_dir, "model.mapped.data"), (string?)json["data_path"]);
        Assert.Equal(new FileInfo(Path.Combine(_dir, "model.mapped.onnx")).Length + new FileInfo(Path.Combine(_dir, "model.mapped.data")).Length, (long)json["bytes"]!);
        Assert.True((int)json["external_tensors"]! > 30);
        Assert.True((bool)json["identical"]!);
        Assert.True((int)json["compared_phrases"]! > 100);
        using var embedder = OnnxEmbedder.Create(_dir);
        Assert.True(embedder.UsesOptimizedModel, embedder.OptimizedModelNote);
        Assert.Equal(cli.Embedder.Model, embedder.Model);
    }

    [Fact]
    public void Prepare_MissingModelDirectory_ExitsTwoWithOneErrorLine()
    {
        var (exit, _, error) = cli.Run("prepare", "--model", Path.Combine(_dir, "none"));
        Assert.Equal(2, exit);
        Assert.StartsWith("error: ", error);
        Assert.Single(error.Trim().Split('\n'));
        Assert.Contains("does not exist", error);
    }
}
