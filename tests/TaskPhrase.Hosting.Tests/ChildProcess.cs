using System.Diagnostics;
using System.Text;

namespace TaskPhrase.Hosting.Tests;

/// <summary>Runs a child process with a time limit; it is killed (with its children) when it overruns.</summary>
public static class ChildProcess
{
    /// <summary>The dotnet host running the tests (set by the SDK), else <c>dotnet</c> from PATH.</summary>
    public static string Dotnet => Environment.GetEnvironmentVariable("DOTNET_HOST_PATH") is { Length: > 0 } host && File.Exists(host) ? host : "dotnet";

    public static ProcessStartInfo StartInfo(string file, IEnumerable<string> args, string? workingDirectory = null)
    {
        var start = new ProcessStartInfo(file)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
            WorkingDirectory = workingDirectory ?? Environment.CurrentDirectory,
        };
        foreach (var a in args) start.ArgumentList.Add(a);
        // A child dotnet must not inherit the test host's MSBuild settings.
        foreach (var key in start.Environment.Keys.Where(k => k.StartsWith("MSBUILD", StringComparison.OrdinalIgnoreCase) || k == "MSBuildExtensionsPath" || k == "MSBuildSDKsPath").ToList())
            start.Environment.Remove(key);
        // No MSBuild nodes or compiler servers that outlive the command (they would hold the output pipes open).
        start.Environment["MSBUILDDISABLENODEREUSE"] = "1";
        start.Environment["DOTNET_CLI_USE_MSBUILD_SERVER"] = "0";
        start.Environment["UseSharedCompilation"] = "false";
        start.Environment["DOTNET_CLI_TELEMETRY_OPTOUT"] = "1";
        start.Environment["DOTNET_NOLOGO"] = "1";
        start.Environment["DOTNET_SKIP_FIRST_TIME_EXPERIENCE"] = "1";
        return start;
    }

    public static (int Exit, string Out, string Err) Run(string file, IEnumerable<string> args, TimeSpan timeout, string? workingDirectory = null)
    {
        using var process = Process.Start(StartInfo(file, args, workingDirectory))!;
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        if (!process.WaitForExit(timeout))
        {
            process.Kill(entireProcessTree: true);
            process.WaitForExit();
            Assert.Fail($"{Path.GetFileName(file)} {string.Join(' ', args)} did not finish within {timeout.TotalSeconds:0} s.{Environment.NewLine}{stdout.Result}{stderr.Result}");
        }
        process.WaitForExit();
        // Output is complete once the pipes close; a grandchild still holding them must not hang the test.
        if (!Task.WaitAll([stdout, stderr], TimeSpan.FromSeconds(30)))
            Assert.Fail($"{Path.GetFileName(file)} exited ({process.ExitCode}) but its output pipes stayed open for 30 s (a leftover child process?).");
        return (process.ExitCode, stdout.Result, stderr.Result);
    }

    /// <summary>Sends SIGTERM (what a service manager does to stop a service).</summary>
    public static void Terminate(Process process)
    {
        var (exit, _, err) = Run("kill", ["-TERM", process.Id.ToString(System.Globalization.CultureInfo.InvariantCulture)], TimeSpan.FromSeconds(10));
        Assert.True(exit == 0, $"kill -TERM failed: {err}");
    }

    public static string Describe(int exit, string stdout, string stderr)
        => new StringBuilder().Append("exit ").Append(exit).AppendLine().AppendLine(stdout).Append(stderr).ToString();
}
