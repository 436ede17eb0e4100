using System.Diagnostics;
using System.Text.Json;

namespace TaskPhrase.Hosting.Tests;

/// <summary>Runs examples/python-client/resolve_client.py (Python 3 standard library only) against the real server.</summary>
[Collection(ServiceTestCollection.Name)]
public class PythonClientTests(ServiceFixture fixture)
{
    private static readonly string Script = Path.Combine(TestPaths.RepoRoot, "examples", "python-client", "resolve_client.py");

    private static (int Exit, string Out, string Err) RunPython(params string[] args)
    {
        var start = new ProcessStartInfo("python3") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        start.ArgumentList.Add("-B");
        start.ArgumentList.Add(Script);
        foreach (var a in args) start.ArgumentList.Add(a);
        using var process = Process.Start(start)!;
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        if (!process.WaitForExit(TimeSpan.FromSeconds(60)))
        {
            process.Kill();
            Assert.Fail("resolve_client.py did not finish within 60 s");
        }
        return (process.ExitCode, stdout.Result, stderr.Result);
    }

    private string Url => fixture.Harbor.BaseAddress.ToString().TrimEnd('/');

    [Fact]
    public void Client_BatchWithOneRejection_PrintsServiceObjectsAndExitsOne()
    {
        var (exit, output, error) = RunPython("--url", Url, "--json", "turn on the hall light", "don't feed the fish");
        Assert.True(exit == 1, $"exit {exit}: {error}");
        var lines = output.Split('\n', StringSplitOptions.RemoveEmptyEntries).Select(l => JsonDocument.Parse(l).RootElement).ToList();
        Assert.Equal(2, lines.Count);
        Assert.Equal(("accepted", "hall-light"), (lines[0].GetProperty("outcome").GetString(), lines[0].GetProperty("task").GetString()));
        Assert.Equal(("rejected", "negated"), (lines[1].GetProperty("outcome").GetString(), lines[1].GetProperty("reason").GetString()));
    }

    [Fact]
    public void Client_OneAcceptedUtterance_HumanLineAndExitZero()
    {
        var (exit, output, error) = RunPython("--url", Url, "pour hot water from the kettle into the teapot");
        Assert.True(exit == 0, $"exit {exit}: {error}");
        Assert.Contains("kettle-pour (pour-arc.v2, 2 axes)  CONFIRM FIRST", output);
    }

    [Fact]
    public void Client_Health_PrintsStatus()
    {
        var (exit, output, _) = RunPython("--url", Url, "--health");
        Assert.Equal(0, exit);
        Assert.Equal("ok", JsonDocument.Parse(output).RootElement.GetProperty("status").GetString());
    }

    [Fact]
    public void Client_NoService_ExitsTwoWithOneLine()
    {
        // A loopback port nobody listens on: take a free port and release it.
        var listener = new System.Net.Sockets.TcpListener(System.Net.IPAddress.Loopback, 0);
        listener.Start();
        int port = ((System.Net.IPEndPoint)listener.LocalEndpoint).Port;
        listener.Stop();
        var (exit, _, error) = RunPython("--url", $"http://127.0.0.1:{port}", "hall light");
        Assert.Equal(2, exit);
        Assert.StartsWith("error: cannot reach", error);
    }
}
