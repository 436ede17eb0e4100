using System.Text.RegularExpressions;
using TaskPhrase.Onnx;

namespace TaskPhrase.Cli.Tests;

/// <summary>What one in-process run of <c>taskphrase</c> printed and returned.</summary>
internal sealed record CliResult(int ExitCode, string Out, string Err)
{
    /// <summary>The non-empty lines of standard error.</summary>
    public string[] ErrLines => Err.Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);

    /// <summary>True when standard error shows a .NET stack trace ("   at Namespace.Type.Method(") or an exception type name.</summary>
    public bool HasStackTrace => Regex.IsMatch(Err, @"^\s+at \S+\(", RegexOptions.Multiline) || Err.Contains("Exception", StringComparison.Ordinal);
}

/// <summary>Runs the CLI in-process (<see cref="CliApp.Run(string[], CliContext)"/>) with captured output and a shared model.</summary>
internal static class CliHarness
{
    public static CliResult Run(OnnxEmbedder model, string[] args, byte[]? stdin = null, Func<string?, OnnxEmbedder>? loadModel = null)
    {
        var stdout = new StringWriter();
        var stderr = new StringWriter();
        var context = new CliContext
        {
            Out = stdout,
            Err = stderr,
            OpenStdin = () => new MemoryStream(stdin ?? []),
            LoadModel = loadModel ?? (_ => model),
            OwnsModels = false,
        };
        int code = CliApp.Run(args, context);
        return new CliResult(code, stdout.ToString(), stderr.ToString());
    }

    /// <summary>A file under tests/data, copied beside the test assembly.</summary>
    public static string Data(params string[] parts) => Path.Combine([AppContext.BaseDirectory, "data", .. parts]);
}
