using System.Security.Cryptography;
using System.Text.Json;
using System.Text.Json.Nodes;
using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Cli.Tests;

/// <summary>
/// <c>taskphrase quantize</c> run in-process: the written int8 directory, its card, determinism across runs, the
/// gate refusing a drifting variant (exit 1, nothing written) and user errors (exit 2, one <c>error:</c> line, nothing
/// written). One quantisation of all-MiniLM-L6-v2 takes about 10 s on the 2-core development machine (three here).
/// </summary>
[Collection(CliCollection.Name)]
[Trait("tier", "slow")]
public sealed class QuantizeCommandTests(CliFixture cli) : IDisposable
{
    // Published SHA-256 of the fp32 all-MiniLM-L6-v2 model.onnx (product.md, "Default model").
    private const string Fp32Sha256 = "4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2";

    // sentence-transformers documentation, Quickstart: all-MiniLM-L6-v2 similarities of "The weather is lovely today."
    // to "It's so sunny outside!" and "He drove to the stadium.", and of the last two.
    private static readonly double[] Published = [0.6660, 0.1046, 0.1411];

    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-cli-quantize-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    private static readonly string[] ModelFiles = ["model.onnx", "vocab.txt", "model.json"];

    private static string Sha(string path)
    {
        using var s = File.OpenRead(path);
        return Convert.ToHexStringLower(SHA256.HashData(s));
    }

    [Fact]
    public void Quantize_WritesGatedVariantWithCard_AndSecondRunIsByteIdentical()
    {
        string first = Path.Combine(_dir, "first");
        var (exit, output, error) = cli.Run("quantize", "--output", first, "--json");

        Assert.True(exit == 0, error);
        Assert.Equal("", error);
        foreach (var name in ModelFiles) Assert.True(File.Exists(Path.Combine(first, name)), name);
        Assert.Empty(Directory.GetFileSystemEntries(_dir, ".*partial*"));

        // The card on disk: method, α, calibration set, source model, gate figures, and the hash of the file beside it.
        var card = JsonNode.Parse(File.ReadAllText(Path.Combine(first, "model.json")))!.AsObject();
        var q = card["quantization"]!;
        Assert.Equal("all-minilm-l6-v2-int8", (string?)card["id"]);
        Assert.Equal(Sha(Path.Combine(first, "model.onnx")), (string?)card["model_sha256"]);
        Assert.Equal(ModelQuantizer.Method, (string?)q["method"]);
        Assert.Equal(0.7, (double)q["alpha"]!);
        Assert.Equal(QuantizationPhrases.Calibration.Count, (int)q["calibration_phrases"]!);
        Assert.Equal(QuantizationPhrases.Sha256(QuantizationPhrases.Calibration), (string?)q["calibration_set_sha256"]);
        Assert.Equal("all-minilm-l6-v2", (string?)q["source_model_id"]);
        Assert.Equal(Fp32Sha256, (string?)q["source_model_sha256"]);
        // 6 layers × (Q, K, V, attention output, intermediate, output) MatMuls with constant weights.
        Assert.Equal(36, (int)q["quantized_matmuls"]!);
        var quality = q["quality"]!;
        Assert.Equal(QuantizationPhrases.HeldOut.Count, (int)quality["held_out_phrases"]!);
        Assert.Equal(QuantizationPhrases.Sha256(QuantizationPhrases.HeldOut), (string?)quality["held_out_set_sha256"]);
        double min = (double)quality["min_cosine"]!, mean = (double)quality["mean_cosine"]!;
        Assert.InRange(min, QuantizationGates.MinCosine, 0.999999);
        Assert.InRange(mean, min, 1.0);
        var matrix = quality["similarity_matrix"]!.AsArray().Select(v => (double)v!).ToArray();
        var sourceMatrix = quality["source_similarity_matrix"]!.AsArray().Select(v => (double)v!).ToArray();
        for (int i = 0; i < 3; i++)
        {
            Assert.Equal(Published[i], matrix[i], QuantizationGates.MatrixTolerance);
            Assert.Equal(Published[i], sourceMatrix[i], 5e-4);
        }
        // The JSON on stdout reports the same figures as the card.
        using (var doc = JsonDocument.Parse(output))
        {
            var r = doc.RootElement;
            Assert.True(r.GetProperty("passed").GetBoolean());
            Assert.Equal(JsonValueKind.Null, r.GetProperty("failure").ValueKind);
            Assert.Equal((string?)card["model_sha256"], r.GetProperty("model_sha256").GetString());
            Assert.Equal(Fp32Sha256, r.GetProperty("source_model_sha256").GetString());
            Assert.Equal((string?)q["calibration_set_sha256"], r.GetProperty("calibration_set_sha256").GetString());
            Assert.Equal(min, r.GetProperty("min_cosine").GetDouble());
            Assert.Equal(matrix, r.GetProperty("similarity_matrix").EnumerateArray().Select(v => v.GetDouble()).ToArray());
        }

        // The variant loads through the CLI (gates checked again at load) and embeds close to the published figure.
        var (embedExit, embedOut, embedErr) = cli.Run("embed", "--model", first, "--json", "The weather is lovely today.", "It's so sunny outside!");
        Assert.True(embedExit == 0, embedErr);
        using (var doc = JsonDocument.Parse(embedOut))
        {
            var v = doc.RootElement.GetProperty("vectors").EnumerateArray().Select(a => a.EnumerateArray().Select(x => x.GetDouble()).ToArray()).ToArray();
            Assert.Equal(Published[0], v[0].Zip(v[1]).Sum(p => p.First * p.Second), QuantizationGates.MatrixTolerance);
        }

        // `check` shows the recorded gate figures of the model it lints with, in text and JSON.
        string registry = Path.Combine(AppContext.BaseDirectory, "data", "registries", "valid", "small.yaml");
        var check = cli.Run("check", "--registry", registry, "--model", first);
        Assert.True(check.Exit == 0, check.Err);
        string modelLine = Assert.Single(check.Out.Split('\n'), l => l.StartsWith("model all-minilm-l6-v2-int8: int8", StringComparison.Ordinal));
        Assert.Contains(min.ToString("0.0000", System.Globalization.CultureInfo.InvariantCulture), modelLine, StringComparison.Ordinal);
        Assert.Contains(Fp32Sha256, modelLine, StringComparison.Ordinal);
        Assert.EndsWith("CLINC150 not measured: pass", modelLine.TrimEnd(), StringComparison.Ordinal);
        var checkJson = cli.Run("check", "--no-lint", "--json", "--registry", registry, "--model", first);
        Assert.True(checkJson.Exit == 0, checkJson.Err);
        using (var doc = JsonDocument.Parse(checkJson.Out))
        {
            var m = doc.RootElement.GetProperty("model");
            Assert.Equal("pass", doc.RootElement.GetProperty("model_gates").GetString());
            Assert.Equal(min, m.GetProperty("quantization").GetProperty("quality").GetProperty("min_cosine").GetDouble());
            Assert.Equal(Fp32Sha256, m.GetProperty("quantization").GetProperty("source_model_sha256").GetString());
        }

        // Determinism: a second run into another directory writes the very same bytes.
        string second = Path.Combine(_dir, "second");
        var again = cli.Run("quantize", "--output", second);
        Assert.True(again.Exit == 0, again.Err);
        Assert.Contains($"wrote {second}", again.Out, StringComparison.Ordinal);
        foreach (var name in ModelFiles)
            Assert.True(Sha(Path.Combine(first, name)) == Sha(Path.Combine(second, name)), $"{name} differs between two runs");

        // A quantised model is not a valid source.
        var twice = cli.Run("quantize", "--model", first, "--output", Path.Combine(_dir, "twice"));
        Assert.Equal(2, twice.Exit);
        Assert.Contains("already quantised", twice.Err, StringComparison.Ordinal);
        Assert.False(Directory.Exists(Path.Combine(_dir, "twice")));
    }

    [Fact]
    public void Quantize_WithoutSmoothing_FailsTheGate_ExitsOneAndWritesNothing()
    {
        // α = 0 is plain per-column int8 without scale migration; docs/int8.md records it below the 0.99 gate.
        string target = Path.Combine(_dir, "alpha0");
        var (exit, output, error) = cli.Run("quantize", "--alpha", "0", "--output", target, "--json");

        Assert.True(exit == 1, $"exit {exit}; stdout: {output}; stderr: {error}");
        Assert.StartsWith("error: quality gate failed, nothing written", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(target));
        Assert.Empty(Directory.GetFileSystemEntries(_dir));
        using var doc = JsonDocument.Parse(output);
        Assert.False(doc.RootElement.GetProperty("passed").GetBoolean());
        Assert.Equal(0, doc.RootElement.GetProperty("alpha").GetDouble());
        Assert.Contains("below the gate", doc.RootElement.GetProperty("failure").GetString(), StringComparison.Ordinal);
        Assert.True(doc.RootElement.GetProperty("min_cosine").GetDouble() < QuantizationGates.MinCosine);
    }

    /// <summary>Placeholders: {dir} the temp dir, {file} an existing file, {fp32} the built-in model directory, {junk} a model dir with a broken model.onnx.</summary>
    private string Resolve(string token) => token switch
    {
        "{dir}" => _dir,
        "{file}" => WriteFile("existing.txt"),
        "{under-file}" => Path.Combine(WriteFile("blocker"), "int8"),
        "{fp32}" => BuiltInModels.Locate(),
        "{junk}" => JunkModel(),
        _ when token.StartsWith("{dir}/", StringComparison.Ordinal) => Path.Combine(_dir, token["{dir}/".Length..]),
        _ => token,
    };

    private string WriteFile(string name)
    {
        string path = Path.Combine(_dir, name);
        File.WriteAllText(path, "not a model directory");
        return path;
    }

    private string JunkModel()
    {
        string dir = Directory.CreateDirectory(Path.Combine(_dir, "junk")).FullName;
        string real = BuiltInModels.Locate();
        File.Copy(Path.Combine(real, "vocab.txt"), Path.Combine(dir, "vocab.txt"));
        File.Copy(Path.Combine(real, "model.json"), Path.Combine(dir, "model.json"));
        File.WriteAllText(Path.Combine(dir, "model.onnx"), "this is not an ONNX model");
        return dir;
    }

    /// <summary>name, arguments (space-separated, placeholders allowed), exit code, a text stderr must contain.</summary>
    public static TheoryData<string, string, int, string> BadInput() => new()
    {
        { "missing model directory", "quantize --model {dir}/no-model --output {dir}/out", 2, "does not exist" },
        { "broken model file", "quantize --model {junk} --output {dir}/out", 2, "model.onnx" },
        { "output is a file", "quantize --output {file}", 2, "is a file" },
        { "output under a file (cannot be created)", "quantize --output {under-file}", 2, "cannot create the output directory" },
        { "output is the source directory", "quantize --model {fp32} --output {fp32}", 2, "source model's directory" },
        { "alpha out of range", "quantize --alpha 1.5 --output {dir}/out", 2, "between 0 and 1" },
        { "alpha not a number", "quantize --alpha strong --output {dir}/out", 2, "strong" },
        { "output missing", "quantize", 2, "--output" },
        { "CLINC150 file missing", "quantize --clinc150 {dir}/none.json --output {dir}/out", 2, "CLINC150 file not found" },
    };

    [Theory]
    [MemberData(nameof(BadInput))]
    public void Quantize_BadInput_ExitsTwoWithOneErrorLineAndWritesNothing(string name, string arguments, int exitCode, string mentions)
    {
        var args = arguments.Split(' ').Select(Resolve).ToArray();
        int prepared = Directory.GetFileSystemEntries(_dir).Length;
        var fp32Before = Directory.GetFiles(BuiltInModels.Locate()).ToDictionary(f => f, Sha);

        var (exit, _, error) = cli.Run(args);

        Assert.True(exit == exitCode, $"{name}: exit {exit}, expected {exitCode}; stderr: {error}");
        var lines = error.Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        Assert.True(lines.Length == 1 && lines[0].StartsWith("error: ", StringComparison.Ordinal), $"{name}: {error}");
        Assert.Contains(mentions, error, StringComparison.Ordinal);
        Assert.DoesNotContain("Exception", error, StringComparison.Ordinal);
        // Nothing written: no output directory, no staging directory left behind, the source model untouched.
        Assert.True(Directory.GetFileSystemEntries(_dir).Length == prepared, $"{name}: files appeared: {string.Join(", ", Directory.GetFileSystemEntries(_dir))}");
        Assert.Equal(fp32Before, Directory.GetFiles(BuiltInModels.Locate()).ToDictionary(f => f, Sha));
    }
}
