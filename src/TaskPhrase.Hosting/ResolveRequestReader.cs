using System.Buffers;
using System.Text.Json;
using Microsoft.AspNetCore.Http;
using Microsoft.Net.Http.Headers;

namespace TaskPhrase.Hosting;

/// <summary>
/// Reads and checks the body of <c>POST /v1/resolve</c>: <c>{"utterance": "..."}</c> or <c>{"utterances": ["...", ...]}</c>.
/// Every refusal is a <see cref="ServiceError"/>; messages never repeat the user's text (it is personal data).
/// </summary>
internal static class ResolveRequestReader
{
    private const string Example = "Send {\"utterance\": \"water the basil\"} or {\"utterances\": [\"water the basil\", \"hall light\"]}.";

    public static void CheckContentType(HttpRequest request)
    {
        if (!MediaTypeHeaderValue.TryParse(request.ContentType, out var type) || !IsJson(type))
            throw new ServiceError(415, "unsupported_media_type",
                $"Content-Type must be application/json (got {(string.IsNullOrEmpty(request.ContentType) ? "none" : "'" + request.ContentType + "'")}). {Example}");
        if (type.Charset.HasValue && !type.Charset.Equals("utf-8", StringComparison.OrdinalIgnoreCase) && !type.Charset.Equals("utf8", StringComparison.OrdinalIgnoreCase))
            throw new ServiceError(415, "unsupported_media_type", $"The request body must be UTF-8 (Content-Type says charset={type.Charset}).");
    }

    private static bool IsJson(MediaTypeHeaderValue type)
        => type.MediaType.Equals("application/json", StringComparison.OrdinalIgnoreCase)
           || (type.Type.Equals("application", StringComparison.OrdinalIgnoreCase) && type.Suffix.Equals("json", StringComparison.OrdinalIgnoreCase));

    /// <summary>Reads the whole body, refusing more than <paramref name="maxBytes"/> bytes with 413.</summary>
    public static async Task<byte[]> ReadBodyAsync(HttpRequest request, int maxBytes, CancellationToken cancellationToken)
    {
        if (request.ContentLength > maxBytes) throw TooLarge(request.ContentLength.Value, maxBytes);
        var body = new ArrayBufferWriter<byte>((int)Math.Min(request.ContentLength ?? 4096, maxBytes) + 1);
        try
        {
            while (true)
            {
                var memory = body.GetMemory(4096);
                int read = await request.Body.ReadAsync(memory, cancellationToken).ConfigureAwait(false);
                if (read == 0) break;
                body.Advance(read);
                if (body.WrittenCount > maxBytes) throw TooLarge(null, maxBytes);
            }
        }
        catch (BadHttpRequestException e)
        {
            throw e.StatusCode switch
            {
                413 => TooLarge(request.ContentLength, maxBytes),
                408 => new ServiceError(408, "body_timeout", "The request body arrived too slowly; send it in one go."),
                _ => ServiceError.BadRequest($"The request body could not be read ({e.Message})."),
            };
        }
        return body.WrittenSpan.ToArray();
    }

    private static ServiceError TooLarge(long? length, int maxBytes)
        => new(413, "payload_too_large",
            $"The request body {(length is { } n ? $"is {n:N0} bytes" : "is larger than the limit")}; the limit is {maxBytes:N0} bytes. Send fewer or shorter utterances per request.");

    /// <summary>Parses the body; <paramref name="batch"/> is true for the <c>utterances</c> form.</summary>
    public static IReadOnlyList<string> Parse(byte[] body, int maxBatch, out bool batch)
    {
        JsonDocument document;
        try
        {
            document = JsonDocument.Parse(body, new JsonDocumentOptions { MaxDepth = 16 });
        }
        catch (JsonException e)
        {
            string where = e.LineNumber is { } line ? $" (line {line + 1}, byte {e.BytePositionInLine + 1})" : "";
            throw new ServiceError(400, "malformed_json", $"The request body is not valid JSON{where}: {e.Message.Split(" Path:")[0].Split(" LineNumber:")[0]} {Example}");
        }
        using (document)
        {
            var root = document.RootElement;
            if (root.ValueKind != JsonValueKind.Object)
                throw ServiceError.BadRequest($"The request body must be a JSON object, not {Kind(root.ValueKind)}. {Example}");
            JsonElement? single = null, many = null;
            foreach (var property in root.EnumerateObject())
            {
                switch (property.Name)
                {
                    case "utterance" when single is null: single = property.Value; break;
                    case "utterances" when many is null: many = property.Value; break;
                    case "utterance" or "utterances": throw ServiceError.BadRequest($"Field '{property.Name}' appears twice; give it once.");
                    default: throw ServiceError.BadRequest($"Unknown field '{Clip(property.Name)}'. {Example}");
                }
            }
            if (single is not null && many is not null)
                throw ServiceError.BadRequest($"Give either 'utterance' or 'utterances', not both. {Example}");
            if (single is { } one)
            {
                batch = false;
                return [ReadText(one, "'utterance'")];
            }
            if (many is not { } list)
                throw ServiceError.BadRequest($"Missing field 'utterance' (or 'utterances'). {Example}");
            batch = true;
            if (list.ValueKind != JsonValueKind.Array)
                throw ServiceError.BadRequest($"'utterances' must be an array of strings, not {Kind(list.ValueKind)}. {Example}");
            int count = list.GetArrayLength();
            if (count == 0) throw ServiceError.BadRequest($"'utterances' is empty; give at least one. {Example}");
            if (count > maxBatch)
                throw new ServiceError(413, "batch_too_large", $"'utterances' has {count} items; the limit is {maxBatch} per request. Split the batch.");
            var texts = new string[count];
            int i = 0;
            foreach (var item in list.EnumerateArray())
            {
                texts[i] = ReadText(item, $"'utterances'[{i}]");
                i++;
            }
            return texts;
        }
    }

    private static string ReadText(JsonElement value, string name)
    {
        if (value.ValueKind != JsonValueKind.String)
            throw ServiceError.BadRequest($"{name} must be a string, not {Kind(value.ValueKind)}. {Example}");
        string text;
        try
        {
            text = value.GetString()!;
        }
        catch (InvalidOperationException)
        {
            throw new ServiceError(400, "malformed_json", $"{name} is not valid text (an unpaired UTF-16 surrogate escape). Send UTF-8 text.");
        }
        if (text.Length == 0) throw ServiceError.BadRequest($"{name} is empty; give the text to resolve.");
        return text;
    }

    private static string Kind(JsonValueKind kind) => kind switch
    {
        JsonValueKind.Object => "an object",
        JsonValueKind.Array => "an array",
        JsonValueKind.String => "a string",
        JsonValueKind.Number => "a number",
        JsonValueKind.True or JsonValueKind.False => "a boolean",
        JsonValueKind.Null => "null",
        _ => kind.ToString(),
    };

    private static string Clip(string name) => name.Length <= 40 ? name : name[..40] + "…";
}
