using System.Text.Json.Serialization;

namespace TaskPhrase.Onnx.Quantization;

/// <summary>
/// Agreement of an int8 model with its fp32 source, measured when it was made and recorded in its card. Immutable.
/// </summary>
public sealed record QuantizationQuality
{
    /// <summary>Number of held-out phrases (never used for calibration) compared.</summary>
    [JsonPropertyName("held_out_phrases")] public int HeldOutPhrases { get; init; }

    /// <summary>SHA-256 of the held-out phrase set.</summary>
    [JsonPropertyName("held_out_set_sha256")] public string? HeldOutSetSha256 { get; init; }

    /// <summary>
    /// Smallest cosine between a phrase's int8 and fp32 embeddings over the held-out set, the int8 embedding made
    /// one at a time or in batches (the smaller of <see cref="SingleMinCosine"/> and <see cref="BatchedMinCosine"/>).
    /// </summary>
    [JsonPropertyName("min_cosine")] public double MinCosine { get; init; }

    /// <summary>Mean cosine between int8 and fp32 embeddings over the held-out set, over both ways of embedding.</summary>
    [JsonPropertyName("mean_cosine")] public double MeanCosine { get; init; }

    /// <summary>Smallest cosine to fp32 with int8 embeddings made one text at a time (informational; the gate is <see cref="MinCosine"/>).</summary>
    [JsonPropertyName("single_min_cosine")] public double? SingleMinCosine { get; init; }

    /// <summary>Smallest cosine to fp32 with int8 embeddings made in batches by <see cref="OnnxEmbedder.EmbedMany"/> (informational; the gate is <see cref="MinCosine"/>).</summary>
    [JsonPropertyName("batched_min_cosine")] public double? BatchedMinCosine { get; init; }

    /// <summary>
    /// Cosine similarities of the int8 model on the sentence-transformers Quickstart sentences, in the order
    /// (weather, sunny), (weather, stadium), (sunny, stadium).
    /// </summary>
    [JsonPropertyName("similarity_matrix")] public IReadOnlyList<double>? SimilarityMatrix { get; init; }

    /// <summary>The same three similarities from the fp32 source model.</summary>
    [JsonPropertyName("source_similarity_matrix")] public IReadOnlyList<double>? SourceSimilarityMatrix { get; init; }

    /// <summary>CLINC150 validation audit of both models at fp32's tuned operating point, when quantised with the dataset; else null.</summary>
    [JsonPropertyName("clinc150")] public Clinc150Figures? Clinc150 { get; init; }
}
