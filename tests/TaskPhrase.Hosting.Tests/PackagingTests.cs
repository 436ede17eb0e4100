using System.Diagnostics;
using System.IO.Compression;
using System.Numerics.Tensors;
using System.Reflection;
using System.Security.Cryptography;
using System.Text.Json;
using System.Xml.Linq;

namespace TaskPhrase.Hosting.Tests;

/// <summary>
/// Slow tier: packs the solution's packages into a temporary folder, installs the CLI as a dotnet tool from there,
/// runs it (version, embed, serve with SIGTERM), and builds a throw-away app against the model package.
/// Nothing leaves the machine: the package source is the temporary folder only, the service binds to 127.0.0.1.
/// </summary>
[Collection(ServiceTestCollection.Name)]
[Trait("tier", "slow")]
public sealed class PackagingTests(ServiceFixture fixture, PackagingTests.PackedPackages packed) : IClassFixture<PackagingTests.PackedPackages>
{
    /// <summary>Packs the solution once for the class (no rebuild: the build this test assembly came from) into a temporary folder.</summary>
    public sealed class PackedPackages : IDisposable
    {
        public PackedPackages()
        {
            Root = Directory.CreateTempSubdirectory("taskphrase-pack-").FullName;
            PackDir = Path.Combine(Root, "packages");
            var clock = Stopwatch.StartNew();
            var (exit, stdout, stderr) = ChildProcess.Run(ChildProcess.Dotnet,
                ["pack", Path.Combine(TestPaths.RepoRoot, "TaskPhrase.sln"), "-c", Configuration, "--no-build", "-o", PackDir, "-nologo", "-v", "quiet", "-nodeReuse:false"],
                TimeSpan.FromMinutes(4), TestPaths.RepoRoot);
            PackTime = clock.Elapsed;
            Assert.True(exit == 0, ChildProcess.Describe(exit, stdout, stderr));
            var cli = Directory.GetFiles(PackDir, "TaskPhrase.Cli.*.nupkg").Single();
            Version = Path.GetFileNameWithoutExtension(cli)["TaskPhrase.Cli.".Length..];
            NuGetConfig = Path.Combine(Root, "nuget.config");
            File.WriteAllText(NuGetConfig, $"""
                <?xml version="1.0" encoding="utf-8"?>
                <configuration>
                  <config><add key="globalPackagesFolder" value="{Path.Combine(Root, "nuget-cache")}" /></config>
                  <packageSources><clear /><add key="local" value="{PackDir}" /></packageSources>
                </configuration>
                """);
        }

        public string Root { get; }

        public string PackDir { get; }

        public string Version { get; }

        public TimeSpan PackTime { get; }

        /// <summary>A NuGet configuration whose only source is <see cref="PackDir"/>, with its own package cache.</summary>
        public string NuGetConfig { get; }

        // The configuration this test assembly was built in.
        private static string Configuration => typeof(PackagingTests).Assembly.GetCustomAttribute<AssemblyConfigurationAttribute>()?.Configuration ?? "Debug";

        public void Dispose()
        {
            try { Directory.Delete(Root, recursive: true); }
            catch (IOException) { }
            catch (UnauthorizedAccessException) { }
        }
    }

    private string PackDir => packed.PackDir;

    [Fact]
    public void Pack_Solution_LibrariesWithDocsAndReadme_ToolInstallsAndRuns()
    {
        var clock = Stopwatch.StartNew();
        string version = packed.Version;

        // Library packages: assembly, XML documentation and README (nuspec <readme>), per the NuGet package layout.
        foreach (var id in new[] { "TaskPhrase", "TaskPhrase.Onnx", "TaskPhrase.Hosting" })
        {
            using var zip = ZipFile.OpenRead(Path.Combine(PackDir, $"{id}.{version}.nupkg"));
            var names = zip.Entries.Select(e => e.FullName).ToHashSet();
            Assert.Contains($"lib/net10.0/{id}.dll", names);
            Assert.Contains($"lib/net10.0/{id}.xml", names);
            Assert.Contains("README.md", names);
            Assert.Equal("README.md", Nuspec(zip).Descendants().Single(e => e.Name.LocalName == "readme").Value);
        }
        using (var models = ZipFile.OpenRead(Path.Combine(PackDir, $"TaskPhrase.Models.MiniLM.{version}.nupkg")))
        {
            var names = models.Entries.Select(e => e.FullName).ToHashSet();
            Assert.Contains("buildTransitive/TaskPhrase.Models.MiniLM.targets", names);
            Assert.DoesNotContain(names, n => n.StartsWith("lib/", StringComparison.Ordinal));
            // SHA-256 of model.onnx as published in product.md ("Default model").
            using var onnx = models.GetEntry("models/all-minilm-l6-v2/model.onnx")!.Open();
            Assert.Equal("4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2", Convert.ToHexStringLower(SHA256.HashData(onnx)));
        }
        using (var tool = ZipFile.OpenRead(Path.Combine(PackDir, $"TaskPhrase.Cli.{version}.nupkg")))
        {
            var names = tool.Entries.Select(e => e.FullName).ToHashSet();
            Assert.Contains("tools/net10.0/any/DotnetToolSettings.xml", names);
            Assert.Contains("tools/net10.0/any/models/all-minilm-l6-v2/model.onnx", names);
            Assert.DoesNotContain(names, n => n.Contains("runtimes/android/", StringComparison.Ordinal) || n.Contains("runtimes/ios/", StringComparison.Ordinal));
        }

        string toolPath = Path.Combine(packed.Root, "tool");
        var install = ChildProcess.Run(ChildProcess.Dotnet,
            ["tool", "install", "--tool-path", toolPath, "--configfile", packed.NuGetConfig, "TaskPhrase.Cli", "--version", version],
            TimeSpan.FromMinutes(2), packed.Root);
        Assert.True(install.Exit == 0, ChildProcess.Describe(install.Exit, install.Out, install.Err));
        string taskphrase = Path.Combine(toolPath, "taskphrase");

        var versionRun = ChildProcess.Run(taskphrase, ["--version"], TimeSpan.FromSeconds(30));
        Assert.Equal(0, versionRun.Exit);
        Assert.StartsWith(version, versionRun.Out.Trim());

        // The installed tool's embedding equals the in-process embedder's (same model, same code): cosine ≥ 0.9999.
        var embed = ChildProcess.Run(taskphrase, ["embed", "--json", "could you water the basil"], TimeSpan.FromSeconds(60));
        Assert.True(embed.Exit == 0, ChildProcess.Describe(embed.Exit, embed.Out, embed.Err));
        var json = JsonDocument.Parse(embed.Out).RootElement;
        Assert.Equal(("all-minilm-l6-v2", 384), (json.GetProperty("model").GetString(), json.GetProperty("dimensions").GetInt32()));
        float[] fromTool = [.. json.GetProperty("vectors")[0].EnumerateArray().Select(v => v.GetSingle())];
        float[] inProcess = fixture.Embedder.EmbedMany(["could you water the basil"]).Vectors[0];
        Assert.True(TensorPrimitives.CosineSimilarity(fromTool, inProcess) >= 0.9999f);

        Assert.True(clock.Elapsed + packed.PackTime < TimeSpan.FromMinutes(4), $"pack took {packed.PackTime}, install and run {clock.Elapsed}");
        ServeAndTerminate(taskphrase);
    }

    private static void ServeAndTerminate(string taskphrase)
    {
        using var process = Process.Start(ChildProcess.StartInfo(taskphrase,
            ["serve", "--registry", TestPaths.HarborRegistry, "--urls", "http://127.0.0.1:0", "--json"]))!;
        var stderr = process.StandardError.ReadToEndAsync();
        try
        {
            var firstLine = process.StandardOutput.ReadLineAsync();
            Assert.True(firstLine.Wait(TimeSpan.FromSeconds(90)), "serve printed no start line within 90 s");
            if (firstLine.Result is null)
            {
                process.WaitForExit(TimeSpan.FromSeconds(10));
                Assert.Fail($"serve ended without a start line: {(stderr.Wait(TimeSpan.FromSeconds(5)) ? stderr.Result : "")}");
            }
            var start = JsonDocument.Parse(firstLine.Result!).RootElement;
            Assert.Equal("listening", start.GetProperty("event").GetString());
            var url = new Uri(start.GetProperty("urls")[0].GetString()!);
            Assert.True(LoopbackGuard.IsLoopback(url.ToString()));

            using var client = new HttpClient { BaseAddress = url, Timeout = TimeSpan.FromSeconds(30) };
            using var response = client.PostAsync("/v1/resolve", new StringContent("{\"utterance\": \"feed the goldfish\"}", System.Text.Encoding.UTF8, "application/json")).Result;
            var r = JsonDocument.Parse(response.Content.ReadAsStringAsync().Result).RootElement;
            Assert.Equal(("accepted", "fish-food"), (r.GetProperty("outcome").GetString(), r.GetProperty("task").GetString()));

            ChildProcess.Terminate(process);
            Assert.True(process.WaitForExit(TimeSpan.FromSeconds(20)), "serve did not stop within 20 s of SIGTERM");
            string log = stderr.Wait(TimeSpan.FromSeconds(10)) ? stderr.Result : "";
            Assert.True(process.ExitCode == 0, $"exit {process.ExitCode}: {log}");
        }
        finally
        {
            if (!process.HasExited) process.Kill(entireProcessTree: true);
        }
    }

    [Fact]
    public void Pack_ModelPackage_ConsumingAppGetsModelFilesInOutput()
    {
        string version = packed.Version;
        // A throw-away app outside the repository (no Directory.*.props apply) that references only the model package,
        // which has no dependencies, so the restore needs nothing but the temporary package folder.
        string app = Directory.CreateDirectory(Path.Combine(packed.Root, "app")).FullName;
        File.WriteAllText(Path.Combine(app, "App.csproj"), $"""
            <Project Sdk="Microsoft.NET.Sdk">
              <PropertyGroup><OutputType>Exe</OutputType><TargetFramework>net10.0</TargetFramework></PropertyGroup>
              <ItemGroup><PackageReference Include="TaskPhrase.Models.MiniLM" Version="{version}" /></ItemGroup>
            </Project>
            """);
        File.WriteAllText(Path.Combine(app, "Program.cs"), "System.Console.WriteLine(\"ok\");\n");
        File.Copy(Path.Combine(TestPaths.RepoRoot, "global.json"), Path.Combine(app, "global.json"));
        File.Copy(packed.NuGetConfig, Path.Combine(app, "nuget.config"));
        var build = ChildProcess.Run(ChildProcess.Dotnet, ["build", "App.csproj", "-o", Path.Combine(app, "out"), "-nologo", "-v", "quiet", "-nodeReuse:false", "-p:UseSharedCompilation=false"],
            TimeSpan.FromMinutes(3), app);
        Assert.True(build.Exit == 0, ChildProcess.Describe(build.Exit, build.Out, build.Err));
        string models = Path.Combine(app, "out", "models", "all-minilm-l6-v2");
        // SHA-256 values published in product.md ("Default model").
        Assert.Equal("4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2", Sha256(Path.Combine(models, "model.onnx")));
        Assert.Equal("b49e80874c5efbc7f4cde245a812673b05ef1360ced56b8bc8c750eaeef3fe0f", Sha256(Path.Combine(models, "vocab.txt")));
        Assert.Equal("all-minilm-l6-v2", JsonDocument.Parse(File.ReadAllText(Path.Combine(models, "model.json"))).RootElement.GetProperty("id").GetString());
    }

    private static string Sha256(string path)
    {
        using var stream = File.OpenRead(path);
        return Convert.ToHexStringLower(SHA256.HashData(stream));
    }

    private static XDocument Nuspec(ZipArchive zip)
    {
        using var stream = zip.Entries.Single(e => e.FullName.EndsWith(".nuspec", StringComparison.Ordinal)).Open();
        return XDocument.Load(stream);
    }
}
