using System.Text;
using System.Text.Json;
using TaskPhrase.Conditioning;

namespace FilmDecoderDemo;

/// <summary>Reads the conditioning source the user gave: an embedding, or conditioning JSON.</summary>
internal static class ConditioningInput
{
    /// <summary>
    /// An embedding as a JSON array of numbers, or the output of <c>taskphrase embed --json</c>
    /// (<c>{"vectors": [[...]]}</c>, first vector).
    /// </summary>
    public static float[] ReadEmbedding(string source, int dimensions)
    {
        using var document = Parse(source);
        var root = document.RootElement;
        var array = root.ValueKind == JsonValueKind.Object && root.TryGetProperty("vectors", out var vectors) && vectors.ValueKind == JsonValueKind.Array && vectors.GetArrayLength() > 0
            ? vectors[0]
            : root;
        if (array.ValueKind != JsonValueKind.Array)
        {
            throw new FormatException($"{Name(source)}: expected a JSON array of {dimensions} numbers or {{\"vectors\": [[...]]}}.");
        }

        var values = array.EnumerateArray().Select(v => v.ValueKind == JsonValueKind.Number ? v.GetSingle() : float.NaN).ToArray();
        if (values.Length != dimensions || values.Any(v => !float.IsFinite(v)))
        {
            throw new FormatException($"{Name(source)}: the embedding has {values.Length} values (all must be finite numbers); the FiLM generator needs {dimensions}.");
        }

        return values;
    }

    /// <summary>
    /// <c>{"layers": [...]}</c>, or a resolution printed by <c>taskphrase resolve --film FILE --json</c>
    /// whose <c>conditioning</c> member holds it. A resolution that was not accepted has no conditioning,
    /// and the arm must not move.
    /// </summary>
    public static FilmConditioning ReadConditioning(string source)
    {
        using var document = Parse(source);
        var root = document.RootElement;
        if (root.ValueKind == JsonValueKind.Object && root.TryGetProperty("outcome", out var outcome) && outcome.GetString() != "accepted")
        {
            throw new FormatException($"{Name(source)}: the resolution's outcome is '{outcome}', so it carries no conditioning; the arm must not move.");
        }

        if (root.ValueKind == JsonValueKind.Object && root.TryGetProperty("conditioning", out var conditioning))
        {
            if (conditioning.ValueKind == JsonValueKind.Null)
            {
                throw new FormatException($"{Name(source)}: \"conditioning\" is null (resolve was run without --film?); the arm must not move.");
            }

            return FilmConditioning.FromJson(conditioning, Name(source));
        }

        return FilmConditioning.FromJson(root, Name(source));
    }

    private static JsonDocument Parse(string source)
    {
        var bytes = source == "-" ? Encoding.UTF8.GetBytes(Console.In.ReadToEnd()) : File.ReadAllBytes(source);

        // The first JSON value is used, so JSON Lines (one resolution per line) work too.
        var reader = new Utf8JsonReader(bytes, new JsonReaderOptions { AllowMultipleValues = true });
        try
        {
            return JsonDocument.ParseValue(ref reader);
        }
        catch (JsonException ex)
        {
            throw new FormatException($"{Name(source)}: not valid JSON at line {(ex.LineNumber ?? 0) + 1}: {ex.Message}", ex);
        }
    }

    private static string Name(string source) => source == "-" ? "standard input" : source;
}
