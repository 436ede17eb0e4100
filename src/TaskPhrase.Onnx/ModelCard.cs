using System.Text.Json;
using System.Text.Json.Serialization;
using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Onnx;

/// <summary>
/// The small JSON card (<c>model.json</c>) that describes a model directory: id, pooling,
/// maximum tokens, dimensions. Immutable.
/// </summary>
public sealed record ModelCard
{
    /// <summary>Model id, e.g. <c>all-minilm-l6-v2</c>.</summary>
    [JsonPropertyName("id")] public required string Id { get; init; }

    /// <summary><c>mean</c> (masked mean over tokens) or <c>cls</c> (first token).</summary>
    [JsonPropertyName("pooling")] public string Pooling { get; init; } = "mean";

    /// <summary>Longest input in tokens, special tokens included.</summary>
    [JsonPropertyName("max_tokens")] public int MaxTokens { get; init; } = 256;

    /// <summary>Embedding width.</summary>
    [JsonPropertyName("dimensions")] public int Dimensions { get; init; } = 384;

    /// <summary>True for uncased vocabularies: input is lower-cased before WordPiece.</summary>
    [JsonPropertyName("lowercase")] public bool Lowercase { get; init; } = true;

    /// <summary>Expected SHA-256 of model.onnx, if recorded; checked at load when present.</summary>
    [JsonPropertyName("model_sha256")] public string? ModelSha256 { get; init; }

    /// <summary>Free-form provenance.</summary>
    [JsonPropertyName("source")] public string? Source { get; init; }

    /// <summary>Licence of the model.</summary>
    [JsonPropertyName("licence")] public string? Licence { get; init; }

    /// <summary>SHA-256 of vocab.txt, if recorded (informational).</summary>
    [JsonPropertyName("vocab_sha256")] public string? VocabSha256 { get; init; }

    /// <summary>
    /// Present on int8 models made by <see cref="ModelQuantizer"/>: method, provenance and measured quality.
    /// Such a card must carry passing quality figures and <see cref="ModelSha256"/>, or the embedder refuses the model.
    /// </summary>
    [JsonPropertyName("quantization")] public ModelQuantizationInfo? Quantization { get; init; }

    /// <summary>
    /// Present on models made by <see cref="LayerPooledModel"/>: which encoder layers of which source sit side by side in
    /// the token states (so <see cref="Dimensions"/> is the source's width times their number).
    /// </summary>
    [JsonPropertyName("layers")] public ModelLayersInfo? Layers { get; init; }

    /// <summary>True when the card describes a quantised (int8) model.</summary>
    [JsonIgnore] public bool IsQuantized => Quantization is not null;

    /// <summary>Reads and validates a card.</summary>
    /// <exception cref="InvalidDataException">The card is missing, malformed or has out-of-range values; the message names the file.</exception>
    public static ModelCard Load(string path)
    {
        if (!File.Exists(path))
            throw new InvalidDataException($"{path}: model card not found. A model directory needs model.onnx, vocab.txt and model.json ({{\"id\", \"pooling\", \"max_tokens\", \"dimensions\"}}).");
        ModelCard? card;
        try
        {
            card = JsonSerializer.Deserialize<ModelCard>(File.ReadAllText(path));
        }
        catch (JsonException e)
        {
            throw new InvalidDataException($"{path}:{e.LineNumber + 1}: model card is not valid JSON ({e.Message}).", e);
        }
        if (card is null || string.IsNullOrWhiteSpace(card.Id))
            throw new InvalidDataException($"{path}: model card needs a non-empty \"id\".");
        if (card.Pooling is not ("mean" or "cls"))
            throw new InvalidDataException($"{path}: \"pooling\" must be \"mean\" or \"cls\", not \"{card.Pooling}\".");
        if (card.MaxTokens is < 3 or > 8192)
            throw new InvalidDataException($"{path}: \"max_tokens\" must be between 3 and 8192, not {card.MaxTokens}.");
        if (card.Dimensions is < 1 or > 65536)
            throw new InvalidDataException($"{path}: \"dimensions\" must be between 1 and 65536, not {card.Dimensions}.");
        if (card.Layers is { } layers && (layers.SourceLayers < 2 || layers.Layers is not { Count: > 0 } || layers.Layers.Any(l => l < 1 || l > layers.SourceLayers)
            || layers.Layers.Zip(layers.Layers.Skip(1)).Any(p => p.Second <= p.First) || card.Dimensions % layers.Layers.Count != 0))
            throw new InvalidDataException($"{path}: the \"layers\" section must give \"source_layers\" (at least 2) and list ascending encoder layers from 1 to it, as many as divide \"dimensions\"; write the model again with 'taskphrase pool-layers'.");
        if (card.Quantization is not null && QuantizationGates.Check(card) is { } failure)
            throw new InvalidDataException($"{path}: the card marks an int8 model but {failure}. Quantise the fp32 model again with 'taskphrase quantize', or use the fp32 model.");
        return card;
    }
}
