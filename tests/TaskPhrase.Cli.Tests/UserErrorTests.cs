using TaskPhrase.Embedding;
using TaskPhrase.Onnx;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Cli.Tests;

/// <summary>
/// User-caused failures of <c>taskphrase</c> in a table: the documented exit code (0 success, 1 check or budget
/// failed, 2 bad usage or input), one <c>error:</c> line on standard error per problem, and no stack trace unless
/// <c>--verbose</c>. Run in-process with the shared model.
/// </summary>
[Collection(CliModelCollection.Name)]
public sealed class UserErrorTests(CliModelFixture fixture) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-cli-errors-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    private static readonly string Small = CliHarness.Data("registries", "valid", "small.yaml");

    private string Write(string name, string text)
    {
        string path = Path.Combine(_dir, name);
        File.WriteAllText(path, text);
        return path;
    }

    /// <summary>Builds a real index of small.yaml with the shared model.</summary>
    private string BuildIndex(string name = "small.tpidx")
    {
        string path = Path.Combine(_dir, name);
        TaskIndexBuilder.BuildAsync(path, RegistryLoader.Load(Small), fixture.Embedder).GetAwaiter().GetResult();
        return path;
    }

    /// <summary>Placeholders in a row's arguments, made real here: {dir}, {index}, {tampered}, {other-model}, {bad-model}, ….</summary>
    private string Resolve(string token) => token switch
    {
        "{small}" => Small,
        "{dir}" => _dir,
        "{missing}" => Path.Combine(_dir, "does-not-exist.yaml"),
        "{index}" => BuildIndex(),
        "{tampered}" => Tampered(),
        "{other-model}" => OtherModel(),
        "{multi-error}" => Write("multi-error.yaml", "version: 1\ntasks:\n  - id: Hall Light\n    title: Press the hall light switch\n    colour: red\n    controller:\n      manifold: reach-press.v1\n      latent_dims: 0\n    phrases:\n      - turn on the hall light\n"),
        "{failing-probes}" => Write("failing.csv", "utterance,expect\nwhat is the weather tomorrow,water-basil\nsing me a song,kettle-pour\n"),
        "{empty-model}" => Directory.CreateDirectory(Path.Combine(_dir, "empty-model")).FullName,
        "{junk-model}" => JunkModel(),
        _ when token.StartsWith("{data}/", StringComparison.Ordinal) => CliHarness.Data(token["{data}/".Length..].Split('/')),
        _ => token,
    };

    private string Tampered()
    {
        string path = BuildIndex("tampered.tpidx");
        var bytes = File.ReadAllBytes(path);
        bytes[bytes.Length / 2] ^= 0x01;
        File.WriteAllBytes(path, bytes);
        return path;
    }

    private string OtherModel()
    {
        // Same registry and width, but recorded as made by another model file (another SHA-256).
        var built = TaskIndex.Load(BuildIndex("for-other.tpidx"));
        var other = new EmbeddingModelInfo(built.Model.Id, new string('0', 64), built.Model.Dimensions, built.Model.MaxTokens, built.Model.Pooling);
        string path = Path.Combine(_dir, "other-model.tpidx");
        TaskIndex.Write(path, built.Registry, other, built.PhraseEmbeddings.Span);
        return path;
    }

    private string JunkModel()
    {
        string dir = Directory.CreateDirectory(Path.Combine(_dir, "junk-model")).FullName;
        string real = BuiltInModels.Locate();
        File.Copy(Path.Combine(real, "vocab.txt"), Path.Combine(dir, "vocab.txt"));
        File.Copy(Path.Combine(real, "model.json"), Path.Combine(dir, "model.json"));
        File.WriteAllText(Path.Combine(dir, "model.onnx"), "this is not an ONNX model");
        return dir;
    }

    /// <summary>
    /// name, arguments (space-separated, placeholders allowed), exit code, error lines on stderr (-1: at least two,
    /// one per problem), a text the stderr (or, for exit 1, stdout) must contain.
    /// </summary>
    public static TheoryData<string, string, int, int, string> Cases() => new()
    {
        { "success", "resolve --registry {small} --json water-the-basil", 0, 0, "" },
        { "check passes", "check --no-lint --registry {small}", 0, 0, "" },
        { "missing registry file", "resolve --registry {missing} water", 2, 1, "does-not-exist.yaml" },
        { "missing registry file (check)", "check --registry {missing}", 2, 1, "registry file not found" },
        { "registry is a directory", "resolve --registry {dir} water", 2, 1, "directory" },
        { "registry is a directory (check)", "check --registry {dir}", 2, 1, "directory" },
        { "binary registry", "resolve --registry {data}/registries/broken/binary-junk.yaml water", 2, 1, "binary-junk.yaml:" },
        { "registry not UTF-8", "build --registry {data}/registries/broken/not-utf8.yaml --output {dir}/x.tpidx", 2, 1, "UTF-8" },
        { "registry with several errors", "resolve --registry {multi-error} water", 2, -1, "multi-error.yaml:" },
        { "check finds errors", "check --no-lint --registry {data}/registries/broken/unknown-key.yaml", 1, 0, "unknown-key.yaml:6:" },
        { "bad probe CSV", "audit --registry {small} --probes {data}/probes/unterminated-quote.csv", 2, 1, "unterminated-quote.csv:" },
        { "several bad probe rows", "audit --registry {small} --probes {data}/probes/several-bad-rows.csv", 2, -1, "several-bad-rows.csv:" },
        { "probe CSV not UTF-8", "audit --registry {small} --probes {data}/probes/not-utf8.csv", 2, 1, "UTF-8" },
        { "missing probe file", "audit --registry {small} --probes {dir}/none.csv", 2, 1, "none.csv" },
        { "budget missed", "audit --registry {small} --probes {failing-probes} --min-accuracy 0.5", 1, 0, "budget missed" },
        { "unknown option", "resolve --registry {small} --jsn water", 2, 1, "--jsn" },
        { "unknown option (check)", "check --bogus --registry {small}", 2, 1, "--bogus" },
        { "unknown verb", "frobnicate", 2, 1, "frobnicate" },
        { "missing required option", "build --registry {small}", 2, 1, "--output" },
        { "rate out of range", "audit --registry {small} --probes {failing-probes} --max-false-accept 1.5", 2, 1, "between 0 and 1" },
        { "rate not a number", "audit --registry {small} --probes {failing-probes} --max-false-accept lots", 2, 1, "lots" },
        { "registry and index together", "resolve --registry {small} --index {dir}/x.tpidx water", 2, 1, "exactly one" },
        { "missing index", "resolve --index {dir}/none.tpidx water", 2, 1, "none.tpidx" },
        { "tampered index", "resolve --index {tampered} water", 2, 1, "damaged" },
        { "registry YAML given as index", "resolve --index {small} water", 2, 1, "not a TaskPhrase index" },
        { "index from another model", "resolve --index {other-model} water", 2, 1, "0000000000000000000000000000000000000000000000000000000000000000" },
        { "missing model dir", "resolve --registry {small} --model {dir}/no-model water", 2, 1, "does not exist" },
        { "model dir without files", "resolve --registry {small} --model {empty-model} water", 2, 1, "missing" },
        { "corrupt model file", "resolve --registry {small} --model {junk-model} water", 2, 1, "model.onnx" },
        // With --index the model loads beside the index; its errors still come first, and alone.
        { "missing model dir, index", "resolve --index {index} --model {dir}/no-model water", 2, 1, "does not exist" },
        { "corrupt model file, index", "resolve --index {index} --model {junk-model} water", 2, 1, "model.onnx" },
        { "corrupt model file and tampered index", "resolve --index {tampered} --model {junk-model} water", 2, 1, "model.onnx" },
        { "missing input file", "resolve --registry {small} --input {dir}/none.txt", 2, 1, "none.txt" },
        { "missing FiLM file", "resolve --registry {small} --film {dir}/none.safetensors water", 2, 1, "none.safetensors" },
        { "bad FiLM file", "resolve --registry {small} --film {data}/safetensors/bad-json.safetensors water", 2, 1, "bad-json.safetensors" },
        { "FiLM of the wrong width", "resolve --registry {small} --film {data}/safetensors/film-2layer-d3-e4.safetensors water", 2, 1, "film-2layer-d3-e4.safetensors" },
    };

    private CliResult Run(string arguments)
    {
        // Arguments are split on spaces; '-' inside a word stands for a space in an utterance ("water-the-basil").
        var args = arguments.Split(' ').Select(Resolve).Select(a => a.StartsWith('-') || a.Contains('/') ? a : a.Replace('-', ' ')).ToArray();
        return CliHarness.Run(fixture.Embedder, args, loadModel: dir => dir is null ? fixture.Embedder : OnnxEmbedder.Create(dir));
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Run_UserError_ExitCodeOneLinePerProblemNoStackTrace(string name, string arguments, int exitCode, int errorLines, string mentions)
    {
        var run = Run(arguments);

        Assert.True(exitCode == run.ExitCode, $"{name}: exit {run.ExitCode}, expected {exitCode}; stderr: {run.Err}");
        Assert.False(run.HasStackTrace, $"{name}: stack trace without --verbose: {run.Err}");
        // Every line on stderr is an error line (warnings aside), so the count is the number of problems.
        var errors = run.ErrLines.Where(l => !l.Contains(": warning", StringComparison.Ordinal)).ToArray();
        Assert.All(errors, l => Assert.StartsWith("error: ", l, StringComparison.Ordinal));
        if (errorLines >= 0) Assert.True(errors.Length == errorLines, $"{name}: {errors.Length} error lines, expected {errorLines}: {run.Err}");
        else Assert.True(errors.Length >= 2, $"{name}: expected one line per problem: {run.Err}");
        string where = exitCode == 2 ? run.Err : run.Out;
        Assert.Contains(mentions, where, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_IndexFromAnotherModel_NamesBothHashesOnOneLine()
    {
        var run = Run("resolve --index {other-model} water");

        string line = Assert.Single(run.ErrLines);
        Assert.Contains(new string('0', 64), line, StringComparison.Ordinal);
        Assert.Contains(fixture.Embedder.Model.Sha256, line, StringComparison.Ordinal);
    }

    [Fact]
    public void Run_Verbose_ShowsTheStackTrace()
    {
        var run = Run("resolve --registry {missing} water --verbose");

        Assert.Equal(2, run.ExitCode);
        Assert.StartsWith("error: ", run.ErrLines[0], StringComparison.Ordinal);
        Assert.True(run.HasStackTrace, run.Err);
    }

    [Fact]
    public void Run_Help_ExitsZeroWithUsageOnStdout()
    {
        var run = Run("resolve --help");

        Assert.Equal(0, run.ExitCode);
        Assert.Contains("--registry", run.Out, StringComparison.Ordinal);
        Assert.Empty(run.Err);
    }
}
