namespace TaskPhrase.Cli.Tests;

public class ServeCommandTests
{
    private static (int Exit, string Out, string Err) Run(params string[] args)
    {
        var stdout = new StringWriter();
        var stderr = new StringWriter();
        // No test here gets as far as loading a model: every case fails on its options first.
        var context = new CliContext { Out = stdout, Err = stderr, LoadModel = _ => throw new InvalidOperationException("no model in these tests") };
        return (CliApp.Run(args, context), stdout.ToString(), stderr.ToString());
    }

    private static string Registry => Path.Combine(AppContext.BaseDirectory, "examples", "harbor-street", "registry.yaml");

    [Fact]
    public void Serve_NonLoopbackUrl_ExitsTwoWithOneLine()
    {
        var (exit, _, err) = Run("serve", "--registry", Registry, "--urls", "http://0.0.0.0:5077");
        Assert.Equal(ExitCodes.BadInput, exit);
        Assert.StartsWith("error: Refusing to listen on 'http://0.0.0.0:5077': it is not a loopback address", err);
        Assert.Single(err.TrimEnd().Split('\n'));
    }

    [Fact]
    public void Serve_NeitherRegistryNorIndex_ExitsTwo()
    {
        var (exit, _, err) = Run("serve");
        Assert.Equal((ExitCodes.BadInput, "error: serve: give exactly one of --registry FILE or --index FILE."), (exit, err.TrimEnd()));
    }

    [Fact]
    public void Serve_MissingRegistryFile_ExitsTwoNamingIt()
    {
        var (exit, _, err) = Run("serve", "--registry", "/nonexistent/registry.yaml");
        Assert.Equal((ExitCodes.BadInput, "error: /nonexistent/registry.yaml: file not found."), (exit, err.TrimEnd()));
    }

    [Theory]
    [InlineData("100")]
    [InlineData("99999999")]
    public void Serve_MaxBodyOutOfRange_ExitsTwo(string size)
    {
        var (exit, _, err) = Run("serve", "--registry", Registry, "--max-body", size);
        Assert.Equal((ExitCodes.BadInput, $"error: --max-body {size}: give a size between 256 and 16777216 bytes."), (exit, err.TrimEnd()));
    }

    [Fact]
    public void Serve_Help_ListsEveryOption()
    {
        var (exit, output, _) = Run("serve", "--help");
        Assert.Equal(0, exit);
        foreach (var option in new[] { "--registry", "--index", "--urls", "--allow-remote", "--model", "--max-body", "--json" })
            Assert.Contains(option, output);
        Assert.Contains("http://127.0.0.1:5077", output);
    }
}
