using TaskPhrase.Onnx;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// The model-path fixture shared by the benchmarks and the paired harness: the built-in embedder, a resolver over
/// the Harbor Street registry, and a <see cref="RawForward"/> of the same command on the embedder's own session.
/// </summary>
internal sealed class ModelSetup : IDisposable
{
    /// <summary>
    /// The command every model-path figure uses: a paraphrase from the Harbor Street probes, 12 tokens with [CLS]
    /// and [SEP], no exact match, accepted for water-basil after every guard has run.
    /// </summary>
    public const string Command = "please could you water the basil on the windowsill";

    /// <summary>An approved phrase of the registry, for the exact-match path.</summary>
    public const string ExactCommand = "water the basil";

    /// <summary>A golden command with a speech-recognition slip, corrected toward the registry's vocabulary before embedding.</summary>
    public const string SlipCommand = "water the bazil";

    public ModelSetup(int intraOpThreads = 2, bool allowSpinning = false, int batchSize = 32)
    {
        Options = new OnnxEmbedderOptions { IntraOpThreads = intraOpThreads, AllowSpinning = allowSpinning, BatchSize = batchSize };
        Embedder = OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory, Options);
        Registry = RegistryLoader.Load(BenchmarkPaths.HarborRegistry);
        Resolver = TaskResolver.Create(Registry, Embedder);
        Tokenizer = new WordPieceTokenizer(Path.Combine(BenchmarkPaths.ModelDirectory, "vocab.txt"), lowercase: true);
        var ids = new long[Embedder.Model.MaxTokens];
        var mask = new long[ids.Length];
        var (count, _) = Tokenizer.Encode(Command, ids, mask);
        Raw = new RawForward(Embedder.Session, ids.AsSpan(0, count));

        var check = Resolver.Resolve(Command);
        if (check.ExactMatch || check.Outcome != ResolutionOutcome.Accepted || check.Task?.Id != "water-basil")
            throw new InvalidOperationException($"The benchmark command \"{Command}\" must be accepted as water-basil through the model, but resolved {check.Outcome} / {check.Reason} ({check.Task?.Id}, exact {check.ExactMatch}); pick another command.");
        if (!Resolver.Resolve(ExactCommand).ExactMatch)
            throw new InvalidOperationException($"\"{ExactCommand}\" is no longer an approved phrase of {BenchmarkPaths.HarborRegistry}; pick another.");
    }

    public OnnxEmbedderOptions Options { get; }

    public OnnxEmbedder Embedder { get; }

    public TaskRegistry Registry { get; }

    public TaskResolver Resolver { get; }

    internal WordPieceTokenizer Tokenizer { get; }

    public RawForward Raw { get; }

    /// <summary>A bare forward pass on a second session of the same model and settings (how far two sessions differ here).</summary>
    public RawForward SecondRaw()
    {
        var ids = new long[Embedder.Model.MaxTokens];
        var (count, _) = Tokenizer.Encode(Command, ids, new long[ids.Length]);
        return new RawForward(Path.Combine(BenchmarkPaths.ModelDirectory, "model.onnx"), ids.AsSpan(0, count), Options.IntraOpThreads, Options.AllowSpinning);
    }

    public void Dispose()
    {
        Raw.Dispose();
        Embedder.Dispose();
    }
}
