using TaskPhrase.Onnx;

namespace TaskPhrase.Cli.Tests;

/// <summary>Loads the default model once for the whole CLI test run (shared by every class in <see cref="CliModelCollection"/>).</summary>
public sealed class CliModelFixture : IDisposable
{
    public CliModelFixture() => Embedder = OnnxEmbedder.CreateDefault();

    public OnnxEmbedder Embedder { get; }

    public void Dispose() => Embedder.Dispose();
}

[CollectionDefinition(Name)]
public sealed class CliModelCollection : ICollectionFixture<CliModelFixture>
{
    public const string Name = "cli-model";
}
