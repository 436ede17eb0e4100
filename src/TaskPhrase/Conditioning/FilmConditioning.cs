using System.Collections.ObjectModel;
using System.Text;
using System.Text.Json;

namespace TaskPhrase.Conditioning;

/// <summary>
/// FiLM conditioning for a downstream decoder (Perez et al., 2018): one (γ, β) pair per decoder layer,
/// computed from the embedding of an approved phrase. Immutable and thread-safe. Equality compares every
/// value exactly; <see cref="IsApproximately"/> allows a tolerance.
/// </summary>
/// <remarks>
/// The JSON form (<see cref="ToJson"/>, <see cref="FromJson(string, string)"/>) is
/// <c>{"layers":[{"gamma":[…],"beta":[…]}, …]}</c>, layer 0 first, numbers in shortest round-trip form,
/// so a parsed copy equals the original exactly.
/// </remarks>
public sealed class FilmConditioning : IEquatable<FilmConditioning>
{
    private readonly FilmLayer[] layers;

    /// <summary>Creates conditioning from its layers, layer 0 first.</summary>
    /// <param name="layers">At least one layer.</param>
    /// <exception cref="ArgumentException">No layers, or a null layer.</exception>
    public FilmConditioning(IEnumerable<FilmLayer> layers)
    {
        ArgumentNullException.ThrowIfNull(layers);
        this.layers = [.. layers];
        if (this.layers.Length == 0)
        {
            throw new ArgumentException("FiLM conditioning needs at least one layer.", nameof(layers));
        }

        if (Array.IndexOf(this.layers, null) is var missing and >= 0)
        {
            throw new ArgumentException($"Layer {missing} is null.", nameof(layers));
        }

        Layers = Array.AsReadOnly(this.layers);
        LayerWidths = Array.AsReadOnly(this.layers.Select(l => l.Width).ToArray());
    }

    /// <summary>The per-layer vectors, layer 0 first.</summary>
    public IReadOnlyList<FilmLayer> Layers { get; }

    /// <summary>The width of each layer, layer 0 first.</summary>
    public IReadOnlyList<int> LayerWidths { get; }

    /// <summary>Identity conditioning (γ = 1, β = 0 in every layer), which leaves a decoder unchanged.</summary>
    /// <param name="widths">The width of each layer; at least one, each at least 1.</param>
    /// <returns>The identity conditioning.</returns>
    public static FilmConditioning Identity(params ReadOnlySpan<int> widths)
    {
        var result = new FilmLayer[widths.Length];
        for (var i = 0; i < widths.Length; i++)
        {
            result[i] = FilmLayer.Identity(widths[i]);
        }

        return new FilmConditioning(result);
    }

    /// <summary>Parses the JSON form <c>{"layers":[{"gamma":[…],"beta":[…]}, …]}</c>.</summary>
    /// <param name="json">The JSON text.</param>
    /// <param name="sourceName">Where the text came from, used in error messages.</param>
    /// <returns>The conditioning.</returns>
    /// <exception cref="FormatException">The text is not valid JSON or not of this form; the message says where.</exception>
    public static FilmConditioning FromJson(string json, string sourceName = "conditioning JSON")
    {
        ArgumentNullException.ThrowIfNull(json);
        ArgumentNullException.ThrowIfNull(sourceName);
        JsonDocument document;
        try
        {
            document = JsonDocument.Parse(json, new JsonDocumentOptions { AllowDuplicateProperties = false });
        }
        catch (JsonException ex)
        {
            throw new FormatException($"{sourceName}: not valid JSON at line {(ex.LineNumber ?? 0) + 1}, column {(ex.BytePositionInLine ?? 0) + 1}: {ex.Message}", ex);
        }

        using (document)
        {
            return FromJson(document.RootElement, sourceName);
        }
    }

    /// <summary>Reads the JSON form from an element already parsed (for example the <c>conditioning</c> member of a resolution).</summary>
    /// <param name="element">An object with a <c>layers</c> array.</param>
    /// <param name="sourceName">Where the element came from, used in error messages.</param>
    /// <returns>The conditioning.</returns>
    /// <exception cref="FormatException">The element is not of this form; the message names the member.</exception>
    public static FilmConditioning FromJson(JsonElement element, string sourceName = "conditioning JSON")
    {
        ArgumentNullException.ThrowIfNull(sourceName);
        if (element.ValueKind != JsonValueKind.Object || !element.TryGetProperty("layers", out var array) || array.ValueKind != JsonValueKind.Array)
        {
            throw new FormatException($"{sourceName}: expected an object {{\"layers\": [{{\"gamma\": [...], \"beta\": [...]}}, ...]}}.");
        }

        var result = new List<FilmLayer>();
        foreach (var layer in array.EnumerateArray())
        {
            var where = $"layers[{result.Count}]";
            if (layer.ValueKind != JsonValueKind.Object)
            {
                throw new FormatException($"{sourceName}: {where} must be an object with \"gamma\" and \"beta\" arrays.");
            }

            var gamma = ReadVector(layer, "gamma", where, sourceName);
            var beta = ReadVector(layer, "beta", where, sourceName);
            if (gamma.Length == 0 || gamma.Length != beta.Length)
            {
                throw new FormatException($"{sourceName}: {where} has {gamma.Length} gamma and {beta.Length} beta values; both must have the layer's width (at least 1).");
            }

            result.Add(FilmLayer.Wrap(gamma, beta));
        }

        if (result.Count == 0)
        {
            throw new FormatException($"{sourceName}: \"layers\" is empty; conditioning has at least one layer.");
        }

        return new FilmConditioning(result);
    }

    /// <summary>Writes the JSON object <c>{"layers":[…]}</c> to <paramref name="writer"/> (for embedding in a larger document).</summary>
    /// <param name="writer">The writer, positioned where a value may be written.</param>
    public void WriteJson(Utf8JsonWriter writer)
    {
        ArgumentNullException.ThrowIfNull(writer);
        writer.WriteStartObject();
        writer.WriteStartArray("layers");
        foreach (var layer in layers)
        {
            writer.WriteStartObject();
            WriteVector(writer, "gamma", layer.Gamma.Span);
            WriteVector(writer, "beta", layer.Beta.Span);
            writer.WriteEndObject();
        }

        writer.WriteEndArray();
        writer.WriteEndObject();
    }

    /// <summary>The compact JSON form.</summary>
    /// <returns><c>{"layers":[{"gamma":[…],"beta":[…]}, …]}</c>.</returns>
    public string ToJson()
    {
        using var buffer = new MemoryStream();
        using (var writer = new Utf8JsonWriter(buffer))
        {
            WriteJson(writer);
        }

        return Encoding.UTF8.GetString(buffer.ToArray());
    }

    /// <summary>True when both have the same layer widths and every value differs by at most <paramref name="tolerance"/>.</summary>
    /// <param name="other">The conditioning to compare with.</param>
    /// <param name="tolerance">Largest allowed absolute difference per element; not negative.</param>
    /// <returns>Whether they match within the tolerance.</returns>
    public bool IsApproximately(FilmConditioning other, float tolerance)
    {
        ArgumentNullException.ThrowIfNull(other);
        if (other.layers.Length != layers.Length)
        {
            return false;
        }

        for (var i = 0; i < layers.Length; i++)
        {
            if (!layers[i].IsApproximately(other.layers[i], tolerance))
            {
                return false;
            }
        }

        return true;
    }

    /// <inheritdoc />
    public bool Equals(FilmConditioning? other)
        => other is not null && (ReferenceEquals(this, other) || layers.AsSpan().SequenceEqual(other.layers));

    /// <inheritdoc />
    public override bool Equals(object? obj) => Equals(obj as FilmConditioning);

    /// <inheritdoc />
    public override int GetHashCode()
    {
        var hash = new HashCode();
        foreach (var layer in layers)
        {
            hash.Add(layer);
        }

        return hash.ToHashCode();
    }

    /// <inheritdoc />
    public override string ToString() => $"FiLM conditioning, layer widths [{string.Join(", ", LayerWidths)}]";

    private static float[] ReadVector(JsonElement layer, string name, string where, string sourceName)
    {
        if (!layer.TryGetProperty(name, out var array) || array.ValueKind != JsonValueKind.Array)
        {
            throw new FormatException($"{sourceName}: {where}.{name} is missing or not an array of numbers.");
        }

        var values = new float[array.GetArrayLength()];
        var i = 0;
        foreach (var item in array.EnumerateArray())
        {
            if (item.ValueKind != JsonValueKind.Number || !item.TryGetSingle(out var value) || !float.IsFinite(value))
            {
                throw new FormatException($"{sourceName}: {where}.{name}[{i}] is {item.GetRawText()}, not a finite number.");
            }

            values[i++] = value;
        }

        return values;
    }

    private static void WriteVector(Utf8JsonWriter writer, string name, ReadOnlySpan<float> values)
    {
        writer.WriteStartArray(name);
        foreach (var value in values)
        {
            writer.WriteNumberValue(value);
        }

        writer.WriteEndArray();
    }
}
