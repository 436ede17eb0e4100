using System.Text.Json.Serialization;

namespace TaskPhrase.Onnx.Quantization;

/// <summary>
/// The <c>quantization</c> section of a model card: how an int8 model was made from its fp32 source and how
/// closely it follows it. A card with this section is loaded only when <see cref="Quality"/> is present and passes
/// the gates of <see cref="QuantizationGates"/>. Immutable.
/// </summary>
public sealed record ModelQuantizationInfo
{
    /// <summary>Method name, e.g. <c>smoothquant-int8-per-column-per-token-wide-fp32-outliers</c>.</summary>
    [JsonPropertyName("method")] public required string Method { get; init; }

    /// <summary>SmoothQuant migration strength α (0 = no smoothing, 1 = all range moved into the weights).</summary>
    [JsonPropertyName("alpha")] public double Alpha { get; init; }

    /// <summary>Number of calibration phrases.</summary>
    [JsonPropertyName("calibration_phrases")] public int CalibrationPhrases { get; init; }

    /// <summary>SHA-256 of the calibration phrase set (see <c>docs/int8.md</c> for how it is hashed).</summary>
    [JsonPropertyName("calibration_set_sha256")] public string? CalibrationSetSha256 { get; init; }

    /// <summary>Id of the fp32 model this was made from.</summary>
    [JsonPropertyName("source_model_id")] public string? SourceModelId { get; init; }

    /// <summary>SHA-256 of the fp32 model.onnx this was made from.</summary>
    [JsonPropertyName("source_model_sha256")] public string? SourceModelSha256 { get; init; }

    /// <summary>Number of MatMul nodes rewritten to int8.</summary>
    [JsonPropertyName("quantized_matmuls")] public int QuantizedMatMuls { get; init; }

    /// <summary>Measured agreement with the fp32 source; null means unmeasured, and such a model is refused.</summary>
    [JsonPropertyName("quality")] public QuantizationQuality? Quality { get; init; }
}
