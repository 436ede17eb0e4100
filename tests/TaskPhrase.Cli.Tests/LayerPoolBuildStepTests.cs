namespace TaskPhrase.Cli.Tests;

/// <summary>
/// The layer-pooled variant as a build step (<c>-p:TaskPhraseLayers=true</c>, target <c>TaskPhraseLayerPoolModel</c>
/// in TaskPhrase.Cli.csproj): MSBuild runs the built tool's <c>pool-layers</c> verb, the output equals what the verb
/// writes itself, and a second build skips the step. Only the target runs here (no rebuild of the tool under test).
/// </summary>
[Collection(CliCollection.Name)]
[Trait("tier", "slow")]
public sealed class LayerPoolBuildStepTests(CliFixture cli) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-layers-build-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    [Fact]
    public void BuildStep_WritesTheSameVariantAsTheVerb_AndIsIncremental()
    {
        string fromBuild = Path.Combine(_dir, "build");
        var (exit, output) = RunTarget(fromBuild);
        Assert.True(exit == 0, output);
        foreach (var name in new[] { "model.onnx", "vocab.txt", "model.json", "model.mapped.onnx", "model.mapped.data", "model.mapped.json" })
            Assert.True(File.Exists(Path.Combine(fromBuild, name)), $"{name} missing; MSBuild said:\n{output}");

        string fromVerb = Path.Combine(_dir, "verb");
        var (verbExit, _, verbError) = cli.Run("pool-layers", "--output", fromVerb);
        Assert.True(verbExit == 0, verbError);
        Assert.Equal(File.ReadAllBytes(Path.Combine(fromVerb, "model.onnx")), File.ReadAllBytes(Path.Combine(fromBuild, "model.onnx")));
        Assert.Equal(File.ReadAllText(Path.Combine(fromVerb, "model.json")), File.ReadAllText(Path.Combine(fromBuild, "model.json")));

        var written = File.GetLastWriteTimeUtc(Path.Combine(fromBuild, "model.json"));
        var (again, againOutput) = RunTarget(fromBuild);
        Assert.True(again == 0, againOutput);
        Assert.Contains("Skipping target \"TaskPhraseLayerPoolModel\"", againOutput);
        Assert.Equal(written, File.GetLastWriteTimeUtc(Path.Combine(fromBuild, "model.json")));
    }

    private static (int Exit, string Output) RunTarget(string output)
    {
        string project = Path.Combine(DotnetProcess.RepoRoot(), "src", "TaskPhrase.Cli", "TaskPhrase.Cli.csproj");
        return DotnetProcess.Run(TimeSpan.FromMinutes(3), "msbuild", project, "-t:TaskPhraseLayerPoolModel", $"-p:Configuration={DotnetProcess.Configuration}",
            "-p:TaskPhraseLayers=true", $"-p:TaskPhraseLayersOutput={output}", "-nologo", "-v:n", "-nodeReuse:false");
    }
}
