using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Tests.Quantization;

/// <summary>Quantises the built-in all-MiniLM-L6-v2 once per test run (with the CLINC150 gate) into a temporary directory, and loads both variants.</summary>
public sealed class QuantizedModelFixture : IDisposable
{
    public QuantizedModelFixture()
    {
        Root = Directory.CreateTempSubdirectory("taskphrase-int8-").FullName;
        ModelDirectory = Path.Combine(Root, "all-minilm-l6-v2-int8");
        // With the CLINC150 gate (Larson et al., 2019): the card then carries its audit figures.
        Result = ModelQuantizer.Quantize(BuiltInModels.MiniLmL6V2, ModelDirectory, new QuantizationOptions { Clinc150Path = TestPaths.Clinc150 });
        Fp32 = OnnxEmbedder.CreateDefault();
        Int8 = Result.Passed ? OnnxEmbedder.Create(ModelDirectory) : null;
    }

    public string Root { get; }

    public string ModelDirectory { get; }

    public QuantizationResult Result { get; }

    public OnnxEmbedder Fp32 { get; }

    /// <summary>The int8 embedder, or null when quantisation failed its gates (tests then fail on <see cref="Result"/>).</summary>
    public OnnxEmbedder? Int8 { get; }

    public void Dispose()
    {
        Int8?.Dispose();
        Fp32.Dispose();
        Directory.Delete(Root, recursive: true);
    }
}

[CollectionDefinition(Name)]
public sealed class QuantizedModelCollection : ICollectionFixture<QuantizedModelFixture>
{
    public const string Name = "quantized-model";
}
