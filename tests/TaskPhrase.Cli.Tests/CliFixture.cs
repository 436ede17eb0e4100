using TaskPhrase.Onnx;

namespace TaskPhrase.Cli.Tests;

/// <summary>One model for the whole CLI test run, handed to every in-process invocation of the CLI.</summary>
public sealed class CliFixture : IDisposable
{
    public CliFixture() => Embedder = OnnxEmbedder.CreateDefault();

    public OnnxEmbedder Embedder { get; }

    /// <summary>Runs <c>taskphrase</c> in-process with the given standard input.</summary>
    public (int Exit, string Out, string Err) RunWithInput(string? stdin, params string[] args)
    {
        var output = new StringWriter();
        var error = new StringWriter();
        var context = new CliContext
        {
            Out = output,
            Err = error,
            OpenStdin = () => new MemoryStream(System.Text.Encoding.UTF8.GetBytes(stdin ?? "")),
            LoadModel = dir => dir is null ? Embedder : OnnxEmbedder.Create(dir),
            OwnsModels = false,
        };
        int exit = CliApp.Run(args, context);
        return (exit, output.ToString(), error.ToString());
    }

    public (int Exit, string Out, string Err) Run(params string[] args) => RunWithInput(null, args);

    public void Dispose() => Embedder.Dispose();

    /// <summary>A path under examples/ of the repository.</summary>
    public static string Example(params string[] parts)
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
            if (File.Exists(Path.Combine(dir.FullName, "TaskPhrase.sln"))) return Path.Combine([dir.FullName, "examples", .. parts]);
        throw new DirectoryNotFoundException("repository root not found");
    }
}

[CollectionDefinition(Name)]
public sealed class CliCollection : ICollectionFixture<CliFixture>
{
    public const string Name = "cli";
}
