using System.Text.Json;

namespace TaskPhrase.Cli.Tests;

/// <summary>
/// <c>taskphrase pool-layers</c> run in-process: the written directory and its report, the model used through
/// <c>check</c>, <c>resolve</c> and <c>tune</c> (the tuned copy names the model, and a registry tuned for another model
/// is flagged), and user errors (exit 2, one <c>error:</c> line, nothing written).
/// </summary>
[Collection(CliCollection.Name)]
public sealed class PoolLayersCommandTests(CliFixture cli) : IDisposable
{
    private static readonly string Registry = CliFixture.Example("harbor-street", "registry.yaml");
    private static readonly string Probes = CliFixture.Example("harbor-street", "probes.csv");

    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-cli-layers-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    [Fact]
    public void PoolLayers_WritesTheModel_WhichCheckResolveAndTuneUse()
    {
        string model = Path.Combine(_dir, "layers");
        var (exit, output, error) = cli.Run("pool-layers", "--output", model, "--json");
        Assert.True(exit == 0, error);
        Assert.Equal("", error);
        using (var doc = JsonDocument.Parse(output))
        {
            var r = doc.RootElement;
            Assert.Equal("all-minilm-l6-v2-layers-4-6", r.GetProperty("model").GetString());
            Assert.Equal([4, 6], r.GetProperty("layers").EnumerateArray().Select(e => e.GetInt32()));
            Assert.Equal(768, r.GetProperty("dimensions").GetInt32());
            Assert.InRange(r.GetProperty("last_layer_min_cosine").GetDouble(), 0.9999, 1.0001);
        }
        foreach (var name in new[] { "model.onnx", "vocab.txt", "model.json" }) Assert.True(File.Exists(Path.Combine(model, name)), name);

        var check = cli.Run("check", "--registry", Registry, "--model", model);
        Assert.Equal(0, check.Exit);
        Assert.Contains("layers 4, 6 of 6 of all-minilm-l6-v2", check.Out, StringComparison.Ordinal);
        Assert.Contains("warning tuned-for-another-model: the registry's thresholds were tuned for the model 'all-minilm-l6-v2'", check.Out, StringComparison.Ordinal);

        // The example registry says its thresholds were tuned for all-minilm-l6-v2: using it with this model is flagged.
        var resolve = cli.Run("resolve", "--registry", Registry, "--model", model, "could you water the basil");
        Assert.Equal(0, resolve.Exit);
        Assert.Contains("water-basil", resolve.Out, StringComparison.Ordinal);
        Assert.Contains("warning: the registry's thresholds were tuned for the model 'all-minilm-l6-v2', but 'all-minilm-l6-v2-layers-4-6' is loaded", resolve.Err, StringComparison.Ordinal);

        // Tuned with this model, the copy names it, and the warning is gone.
        string tuned = Path.Combine(_dir, "tuned.yaml");
        var tune = cli.Run("tune", "--registry", Registry, "--probes", Probes, "--model", model, "--max-false-accept", "0.05", "--max-wrong-task", "0.01",
            "--strategies", "centroid", "--output", tuned);
        Assert.True(tune.Exit == 0, tune.Err);
        Assert.Contains("\nmodel: all-minilm-l6-v2-layers-4-6\n", File.ReadAllText(tuned).Replace("\r\n", "\n"), StringComparison.Ordinal);
        var again = cli.Run("resolve", "--registry", tuned, "--model", model, "could you water the basil");
        Assert.Equal(0, again.Exit);
        Assert.DoesNotContain("warning", again.Err, StringComparison.Ordinal);
        Assert.DoesNotContain("tuned-for-another-model", cli.Run("check", "--registry", tuned, "--model", model).Out, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("6", "Layer 6 alone is the source model itself")]
    [InlineData("4,9", "Layer 9 does not exist: the model has encoder layers 1 to 6.")]
    [InlineData("six", "--layers takes layer numbers separated by commas")]
    public void PoolLayers_BadLayers_ExitsTwoWithOneErrorLine(string layers, string message)
    {
        string model = Path.Combine(_dir, "bad");
        var (exit, _, error) = cli.Run("pool-layers", "--output", model, "--layers", layers);
        Assert.Equal(2, exit);
        var lines = error.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Single(lines);
        Assert.StartsWith("error: ", lines[0], StringComparison.Ordinal);
        Assert.Contains(message, lines[0], StringComparison.Ordinal);
        Assert.DoesNotContain("(Parameter", lines[0], StringComparison.Ordinal);
        Assert.False(Directory.Exists(model));
    }
}
