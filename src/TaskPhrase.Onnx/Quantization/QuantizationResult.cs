namespace TaskPhrase.Onnx.Quantization;

/// <summary>Outcome of <see cref="ModelQuantizer.Quantize"/>. Immutable.</summary>
/// <param name="Passed">True when every gate passed and the model directory was written.</param>
/// <param name="OutputDirectory">The directory written (nothing is written there when <paramref name="Passed"/> is false).</param>
/// <param name="Card">The model card (written as model.json when <paramref name="Passed"/> is true).</param>
/// <param name="Failure">Why a gate failed, or null.</param>
public sealed record QuantizationResult(bool Passed, string OutputDirectory, ModelCard Card, string? Failure)
{
    /// <summary>The card's quantisation section (never null on a result).</summary>
    public ModelQuantizationInfo Quantization => Card.Quantization!;
}
