using System.Text.Json.Serialization;

namespace TaskPhrase.Onnx.Quantization;

/// <summary>
/// CLINC150 validation audit of an int8 model and its fp32 source at the operating point tuned on fp32
/// (Larson et al., 2019; protocol in docs/int8.md). Recorded in the card when <c>quantize</c> was given the dataset.
/// Immutable.
/// </summary>
public sealed record Clinc150Figures
{
    /// <summary>SHA-256 of the CLINC150 JSON file used.</summary>
    [JsonPropertyName("dataset_sha256")] public string? DatasetSha256 { get; init; }

    /// <summary>The accept threshold tuned on the fp32 model's even validation rows.</summary>
    [JsonPropertyName("accept")] public double Accept { get; init; }

    /// <summary>The margin tuned with it.</summary>
    [JsonPropertyName("margin")] public double Margin { get; init; }

    /// <summary>In-scope queries audited (odd rows).</summary>
    [JsonPropertyName("in_scope")] public int InScope { get; init; }

    /// <summary>Out-of-scope queries audited (odd rows).</summary>
    [JsonPropertyName("out_of_scope")] public int OutOfScope { get; init; }

    /// <summary>The fp32 model's audit rates.</summary>
    [JsonPropertyName("fp32")] public Clinc150Rates? Fp32 { get; init; }

    /// <summary>The int8 model's audit rates at the same thresholds.</summary>
    [JsonPropertyName("int8")] public Clinc150Rates? Int8 { get; init; }
}

/// <summary>Audit rates of one model on the CLINC150 audit rows (fractions, 0 to 1). Immutable.</summary>
public sealed record Clinc150Rates
{
    /// <summary>In-scope queries accepted as the right task / in-scope queries.</summary>
    [JsonPropertyName("in_scope_accuracy")] public double InScopeAccuracy { get; init; }

    /// <summary>In-scope queries accepted as another task / in-scope queries.</summary>
    [JsonPropertyName("wrong_task")] public double WrongTask { get; init; }

    /// <summary>Out-of-scope queries accepted as any task / out-of-scope queries.</summary>
    [JsonPropertyName("false_accept")] public double FalseAccept { get; init; }
}
