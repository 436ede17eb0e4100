using Spectre.Console;
using TaskPhrase.Onnx;

namespace TaskPhrase.Cli;

/// <summary>What a command needs from its surroundings: output streams, standard input, and how to load a model.</summary>
internal sealed class CliContext
{
    public required TextWriter Out { get; init; }
    public required TextWriter Err { get; init; }

    /// <summary>Standard input (for <c>--input -</c> and the interactive prompt).</summary>
    public Func<Stream> OpenStdin { get; init; } = System.Console.OpenStandardInput;

    /// <summary>True when a person is at the terminal (prompt loop, colour, progress).</summary>
    public bool Interactive { get; init; }

    /// <summary>Loads an embedder for <c>--model</c> (null: the built-in default). Tests inject a shared one.</summary>
    public Func<string?, OnnxEmbedder> LoadModel { get; init; } = dir => dir is null ? OnnxEmbedder.CreateDefault() : OnnxEmbedder.Create(dir);

    /// <summary>
    /// Loads an embedder for a batch job (<c>build</c>, <c>audit</c>, <c>tune</c>: whole registries and probe suites
    /// embedded in batches); null uses <see cref="LoadModel"/>. The tool sets it to
    /// <see cref="OnnxEmbedderOptions.ForBatchWork"/> (batches side by side; the defaults suit single commands).
    /// </summary>
    public Func<string?, OnnxEmbedder>? LoadBatchModel { get; init; }

    /// <summary>True when the caller owns embedders returned by <see cref="LoadModel"/> (tests share one).</summary>
    public bool OwnsModels { get; init; } = true;

    /// <summary>A Spectre console over <see cref="Out"/>, with colour only when interactive; redirected output is not wrapped.</summary>
    public IAnsiConsole Console(TextWriter? writer = null)
    {
        var console = AnsiConsole.Create(new AnsiConsoleSettings
        {
            Out = new AnsiConsoleOutput(writer ?? Out),
            Ansi = Interactive ? AnsiSupport.Detect : AnsiSupport.No,
            ColorSystem = Interactive ? ColorSystemSupport.Detect : ColorSystemSupport.NoColors,
            Interactive = Interactive ? InteractionSupport.Detect : InteractionSupport.No,
        });
        if (!Interactive) console.Profile.Width = 1000;
        return console;
    }

    /// <summary>Loads the model, turning load failures into one-line errors.</summary>
    public ModelLease Model(string? directory) => Load(LoadModel, directory);

    /// <summary>Loads the model for a batch job (<see cref="LoadBatchModel"/>, else <see cref="LoadModel"/>).</summary>
    public ModelLease BatchModel(string? directory) => Load(LoadBatchModel ?? LoadModel, directory);

    private ModelLease Load(Func<string?, OnnxEmbedder> load, string? directory)
    {
        try
        {
            return new ModelLease(load(directory), OwnsModels);
        }
        catch (Exception e) when (e is DirectoryNotFoundException or InvalidDataException or FileNotFoundException)
        {
            throw new CliException(e.Message, ExitCodes.BadInput, e);
        }
    }
}

/// <summary>An embedder for the length of one command; disposed only when the command owns it.</summary>
internal sealed class ModelLease(OnnxEmbedder embedder, bool owned) : IDisposable
{
    public OnnxEmbedder Embedder { get; } = embedder;

    public void Dispose()
    {
        if (owned) Embedder.Dispose();
    }
}
