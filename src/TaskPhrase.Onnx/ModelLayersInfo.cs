using System.Text.Json.Serialization;

namespace TaskPhrase.Onnx;

/// <summary>
/// The <c>layers</c> section of a model card: the model's token states are the side-by-side outputs of several encoder
/// layers of its source model (made by <see cref="LayerPooledModel"/>), pooled as the card's <c>pooling</c> says.
/// Immutable.
/// </summary>
public sealed record ModelLayersInfo
{
    /// <summary>Encoder layers, 1-based and ascending, whose outputs are placed side by side (e.g. <c>[4, 6]</c>).</summary>
    [JsonPropertyName("layers")] public required IReadOnlyList<int> Layers { get; init; }

    /// <summary>Number of encoder layers of the source model.</summary>
    [JsonPropertyName("source_layers")] public int SourceLayers { get; init; }

    /// <summary>Id of the model this was made from.</summary>
    [JsonPropertyName("source_model_id")] public string? SourceModelId { get; init; }

    /// <summary>SHA-256 of the model.onnx this was made from.</summary>
    [JsonPropertyName("source_model_sha256")] public string? SourceModelSha256 { get; init; }

    /// <summary>
    /// Lowest cosine, over the built-in held-out phrases, between the source model's embedding and the part of this
    /// model's embedding that comes from the last layer (renormalised); null when the last layer is not among
    /// <see cref="Layers"/>.
    /// </summary>
    [JsonPropertyName("last_layer_min_cosine")] public double? LastLayerMinCosine { get; init; }
}
