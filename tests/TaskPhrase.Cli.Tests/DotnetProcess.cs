using System.Diagnostics;
using System.Reflection;

namespace TaskPhrase.Cli.Tests;

/// <summary>Runs the dotnet host (MSBuild, publish, a published tool) as a child process, for the build-step tests.</summary>
internal static class DotnetProcess
{
    /// <summary>The configuration these tests were built in (Release in CI).</summary>
    public static string Configuration => typeof(DotnetProcess).Assembly.GetCustomAttribute<AssemblyConfigurationAttribute>()?.Configuration ?? "Debug";

    /// <summary>The repository root (the folder with TaskPhrase.sln).</summary>
    public static string RepoRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
            if (File.Exists(Path.Combine(dir.FullName, "TaskPhrase.sln"))) return dir.FullName;
        throw new DirectoryNotFoundException($"TaskPhrase.sln not found above {AppContext.BaseDirectory}.");
    }

    /// <summary>Runs <c>dotnet ARGUMENTS</c>; exit code and both output streams, or −1 when it outlives <paramref name="timeout"/> (then killed).</summary>
    public static (int Exit, string Output) Run(TimeSpan timeout, params string[] arguments)
    {
        var start = new ProcessStartInfo(Environment.GetEnvironmentVariable("DOTNET_HOST_PATH") is { Length: > 0 } host ? host : "dotnet")
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (var a in arguments) start.ArgumentList.Add(a);
        using var process = Process.Start(start)!;
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        if (!process.WaitForExit(timeout))
        {
            process.Kill(entireProcessTree: true);
            return (-1, $"dotnet {string.Join(' ', arguments)} did not finish within {timeout}");
        }
        return (process.ExitCode, stdout.Result + stderr.Result);
    }
}
