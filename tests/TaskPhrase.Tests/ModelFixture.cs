using TaskPhrase.Onnx;

namespace TaskPhrase.Tests;

/// <summary>Loads the default model once for the whole test run (shared by every class in <see cref="ModelCollection"/>).</summary>
public sealed class ModelFixture : IDisposable
{
    public ModelFixture() => Embedder = OnnxEmbedder.CreateDefault();

    public OnnxEmbedder Embedder { get; }

    public void Dispose() => Embedder.Dispose();
}

[CollectionDefinition(Name)]
public sealed class ModelCollection : ICollectionFixture<ModelFixture>
{
    public const string Name = "model";
}
