using System.Reflection.PortableExecutable;
using System.Runtime.InteropServices;

namespace TaskPhrase.Cli.Tests;

/// <summary>
/// A publish for one runtime (<c>dotnet publish src/TaskPhrase.Cli -c Release -r RID -o DIR</c>): the tool is compiled
/// ahead of time (a ReadyToRun image carries a managed native header in its CLI header: ECMA-335 II.25.3.3, and the
/// ReadyToRun format of the .NET runtime documentation; common practice), the publish folder gets the mapped model form
/// (target <c>TaskPhrasePrepareModelPublish</c>), and the published tool resolves a command with it.
/// </summary>
[Collection(CliCollection.Name)]
[Trait("tier", "slow")]
public sealed class PublishTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-publish-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    [Fact]
    public void Publish_ForOneRuntime_IsReadyToRun_WithTheMappedModel_AndResolves()
    {
        string rid = RuntimeInformation.RuntimeIdentifier;
        var (exit, output) = DotnetProcess.Run(TimeSpan.FromMinutes(5), "publish", Path.Combine(DotnetProcess.RepoRoot(), "src", "TaskPhrase.Cli", "TaskPhrase.Cli.csproj"),
            "-c", DotnetProcess.Configuration, "-r", rid, "-o", _dir, "-nologo", "-nodeReuse:false");
        Assert.True(exit == 0, output);

        using (var pe = new PEReader(File.OpenRead(Path.Combine(_dir, "TaskPhrase.Cli.dll"))))
            Assert.True(pe.PEHeaders.CorHeader!.ManagedNativeHeaderDirectory.Size > 0, "TaskPhrase.Cli.dll is not a ReadyToRun image");
        foreach (var name in new[] { "model.mapped.onnx", "model.mapped.data", "model.mapped.json" })
            Assert.True(File.Exists(Path.Combine(_dir, "models", "all-minilm-l6-v2", name)), $"{name} missing from the publish folder; MSBuild said:\n{output}");

        string registry = Path.Combine(DotnetProcess.RepoRoot(), "examples", "harbor-street", "registry.yaml");
        var (resolveExit, json) = DotnetProcess.Run(TimeSpan.FromMinutes(1), Path.Combine(_dir, "TaskPhrase.Cli.dll"), "resolve", "--registry", registry, "--json", "could you water the basil please");
        Assert.True(resolveExit == 0, json);
        Assert.Contains("\"water-basil\"", json);
    }
}
