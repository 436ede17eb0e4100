using System.Collections.ObjectModel;
using System.Text;
using System.Text.Json;
using System.Text.Unicode;

namespace TaskPhrase.Conditioning;

/// <summary>
/// Parses and validates the JSON header of a safetensors file against the size of its byte buffer.
/// Rules (huggingface/safetensors README "Format" and notes, and its reference reader
/// <c>Metadata::validate</c> in <c>safetensors/src/tensor.rs</c>): the header is UTF-8 JSON that begins
/// with <c>{</c>; duplicate keys are not allowed; each tensor has <c>dtype</c>, <c>shape</c> and
/// <c>data_offsets</c> [begin, end) relative to the byte buffer; shape × element size = end − begin;
/// tensors do not overlap and together cover the whole buffer (no holes); <c>__metadata__</c> maps
/// strings to strings. This reader is stricter than the reference in one way: it refuses unknown keys in a
/// tensor entry, so that a misspelt key (e.g. the old <c>offsets</c>) is reported instead of ignored.
/// </summary>
internal sealed class SafeTensorsHeader
{
    /// <summary>The special key of the free-form string-to-string map.</summary>
    public const string MetadataKey = "__metadata__";

    private SafeTensorsHeader(IReadOnlyList<SafeTensorInfo> tensors, IReadOnlyDictionary<string, SafeTensorInfo> byName, IReadOnlyDictionary<string, string> metadata)
    {
        Tensors = tensors;
        ByName = byName;
        Metadata = metadata;
    }

    /// <summary>The tensors in the order of their data in the buffer.</summary>
    public IReadOnlyList<SafeTensorInfo> Tensors { get; }

    /// <summary>The tensors by name.</summary>
    public IReadOnlyDictionary<string, SafeTensorInfo> ByName { get; }

    /// <summary>The <c>__metadata__</c> map (empty when absent).</summary>
    public IReadOnlyDictionary<string, string> Metadata { get; }

    /// <summary>Parses <paramref name="header"/> and checks every tensor against a byte buffer of <paramref name="bufferLength"/> bytes.</summary>
    /// <exception cref="SafeTensorsException">The header is malformed or does not fit the buffer.</exception>
    public static SafeTensorsHeader Parse(ReadOnlySpan<byte> header, long bufferLength, string source)
    {
        if (!Utf8.IsValid(header))
        {
            var at = FirstInvalidUtf8(header);
            throw new SafeTensorsException(source, null, $"the header is not valid UTF-8 ({Where(header, at)}); the file is corrupt or not a safetensors file.");
        }

        if (header.IsEmpty || header[0] != (byte)'{')
        {
            var found = header.IsEmpty ? "it is empty" : $"it starts with '{(char)header[0]}'";
            throw new SafeTensorsException(source, null, $"the header must be a JSON object beginning with '{{', but {found}; the file is not a safetensors file.");
        }

        var entries = new List<(SafeTensorInfo Info, long Position)>();
        IReadOnlyDictionary<string, string> metadata = ReadOnlyDictionary<string, string>.Empty;
        var reader = new Utf8JsonReader(header, new JsonReaderOptions { CommentHandling = JsonCommentHandling.Disallow, AllowTrailingCommas = false, MaxDepth = 8 });
        try
        {
            reader.Read();
            var seen = new Dictionary<string, long>(StringComparer.Ordinal);
            while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
            {
                var position = reader.TokenStartIndex;
                var name = reader.GetString()!;
                if (seen.TryGetValue(name, out var first))
                {
                    var what = name == MetadataKey ? $"'{MetadataKey}'" : $"tensor '{name}'";
                    throw new SafeTensorsException(source, null, $"{what} appears twice in the header ({Where(header, first)} and {Where(header, position)}); names must be unique. Remove one of them.");
                }

                seen.Add(name, position);
                reader.Read();
                if (name == MetadataKey)
                {
                    metadata = ReadMetadata(ref reader, header, source);
                }
                else
                {
                    entries.Add((ReadTensor(ref reader, header, name, position, bufferLength, source), position));
                }
            }

            // After the root object only white space may follow (the reader throws on anything else).
            reader.Read();
        }
        catch (JsonException ex)
        {
            var line = (ex.LineNumber ?? 0) + 1;
            var column = (ex.BytePositionInLine ?? 0) + 1;
            throw new SafeTensorsException(source, null, $"the header is not valid JSON (header line {line}, column {column}): {TrimReaderMessage(ex.Message)} The file is corrupt or was not written by a safetensors writer.", ex);
        }

        CheckCoverage(entries, header, bufferLength, source);

        var ordered = entries.Select(e => e.Info).OrderBy(t => t.DataBegin).ThenBy(t => t.DataEnd).ToArray();
        var byName = ordered.ToDictionary(t => t.Name, StringComparer.Ordinal);
        return new SafeTensorsHeader(Array.AsReadOnly(ordered), new ReadOnlyDictionary<string, SafeTensorInfo>(byName), metadata);
    }

    private static IReadOnlyDictionary<string, string> ReadMetadata(ref Utf8JsonReader reader, ReadOnlySpan<byte> header, string source)
    {
        if (reader.TokenType == JsonTokenType.Null)
        {
            return ReadOnlyDictionary<string, string>.Empty;
        }

        if (reader.TokenType != JsonTokenType.StartObject)
        {
            throw new SafeTensorsException(source, null, $"'{MetadataKey}' is {Kind(reader.TokenType)} ({Where(header, reader.TokenStartIndex)}); it must be an object of string values.");
        }

        var map = new Dictionary<string, string>(StringComparer.Ordinal);
        while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
        {
            var position = reader.TokenStartIndex;
            var key = reader.GetString()!;
            reader.Read();
            if (reader.TokenType != JsonTokenType.String)
            {
                throw new SafeTensorsException(source, null, $"'{MetadataKey}' value of '{key}' is {Kind(reader.TokenType)} ({Where(header, position)}); metadata values must be strings. Quote the value.");
            }

            if (!map.TryAdd(key, reader.GetString()!))
            {
                throw new SafeTensorsException(source, null, $"'{MetadataKey}' key '{key}' appears twice ({Where(header, position)}); keys must be unique. Remove one of them.");
            }
        }

        return new ReadOnlyDictionary<string, string>(map);
    }

    private static SafeTensorInfo ReadTensor(ref Utf8JsonReader reader, ReadOnlySpan<byte> header, string name, long position, long bufferLength, string source)
    {
        if (reader.TokenType != JsonTokenType.StartObject)
        {
            throw new SafeTensorsException(source, name, $"the entry is {Kind(reader.TokenType)} ({Where(header, position)}); it must be an object with dtype, shape and data_offsets.");
        }

        string? dtypeName = null;
        long[]? shape = null;
        long[]? offsets = null;
        while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
        {
            var keyPosition = reader.TokenStartIndex;
            var key = reader.GetString()!;
            reader.Read();
            switch (key)
            {
                case "dtype" when dtypeName is null:
                    if (reader.TokenType != JsonTokenType.String)
                    {
                        throw new SafeTensorsException(source, name, $"dtype is {Kind(reader.TokenType)} ({Where(header, keyPosition)}); it must be a string such as \"F32\".");
                    }

                    dtypeName = reader.GetString()!;
                    break;
                case "shape" when shape is null:
                    shape = ReadIntegers(ref reader, header, name, "shape", keyPosition, source);
                    break;
                case "data_offsets" when offsets is null:
                    offsets = ReadIntegers(ref reader, header, name, "data_offsets", keyPosition, source);
                    if (offsets.Length != 2)
                    {
                        throw new SafeTensorsException(source, name, $"data_offsets has {offsets.Length} numbers ({Where(header, keyPosition)}); it must be [begin, end].");
                    }

                    break;
                case "dtype" or "shape" or "data_offsets":
                    throw new SafeTensorsException(source, name, $"'{key}' appears twice in the entry ({Where(header, keyPosition)}); remove one of them.");
                default:
                    throw new SafeTensorsException(source, name, $"unknown key '{key}' in the entry ({Where(header, keyPosition)}); a tensor entry has exactly dtype, shape and data_offsets.");
            }
        }

        var missing = dtypeName is null ? "dtype" : shape is null ? "shape" : offsets is null ? "data_offsets" : null;
        if (missing is not null)
        {
            throw new SafeTensorsException(source, name, $"'{missing}' is missing from the entry ({Where(header, position)}); a tensor entry has dtype, shape and data_offsets.");
        }

        if (!SafeTensorsDTypes.TryParse(dtypeName!, out var dtype))
        {
            throw new SafeTensorsException(source, name, $"unknown dtype '{dtypeName}' ({Where(header, position)}); expected one of {SafeTensorsDTypes.NameList}.");
        }

        long elements;
        long bytes;
        try
        {
            elements = 1;
            foreach (var dimension in shape!)
            {
                elements = checked(elements * dimension);
            }

            bytes = checked(elements * SafeTensorsDTypes.Size(dtype));
        }
        catch (OverflowException)
        {
            throw new SafeTensorsException(source, name, $"shape {SafeTensorInfo.FormatShape(shape!)} of {dtypeName} has more bytes than a 64-bit size can count ({Where(header, position)}); the header is corrupt.");
        }

        var (begin, end) = (offsets![0], offsets[1]);
        if (end < begin)
        {
            throw new SafeTensorsException(source, name, $"data_offsets [{begin}, {end}] end before they begin ({Where(header, position)}); the header is corrupt.");
        }

        if (end - begin != bytes)
        {
            throw new SafeTensorsException(source, name, $"shape {SafeTensorInfo.FormatShape(shape!)} of {dtypeName} needs {bytes} bytes but data_offsets [{begin}, {end}] cover {end - begin} bytes ({Where(header, position)}); the dtype, shape or offsets are wrong.");
        }

        if (end > bufferLength)
        {
            throw new SafeTensorsException(source, name, $"data_offsets [{begin}, {end}] reach past the end of the byte buffer, which holds {bufferLength} bytes ({Where(header, position)}); the file is truncated or the header is wrong.");
        }

        return new SafeTensorInfo(name, dtype, shape!, begin, end, elements);
    }

    private static long[] ReadIntegers(ref Utf8JsonReader reader, ReadOnlySpan<byte> header, string name, string field, long position, string source)
    {
        if (reader.TokenType != JsonTokenType.StartArray)
        {
            throw new SafeTensorsException(source, name, $"{field} is {Kind(reader.TokenType)} ({Where(header, position)}); it must be an array of non-negative integers.");
        }

        var values = new List<long>();
        while (reader.Read() && reader.TokenType != JsonTokenType.EndArray)
        {
            var label = $"{field}[{values.Count}]";
            if (reader.TokenType != JsonTokenType.Number)
            {
                throw new SafeTensorsException(source, name, $"{label} is {Kind(reader.TokenType)} ({Where(header, reader.TokenStartIndex)}); it must be a non-negative integer.");
            }

            var text = Encoding.UTF8.GetString(reader.ValueSpan);
            if (text.StartsWith('-'))
            {
                throw new SafeTensorsException(source, name, $"{label} is negative ({text}, {Where(header, reader.TokenStartIndex)}); sizes and offsets must be non-negative integers.");
            }

            if (text.AsSpan().IndexOfAny('.', 'e', 'E') >= 0)
            {
                throw new SafeTensorsException(source, name, $"{label} is {text}, not an integer ({Where(header, reader.TokenStartIndex)}); write it without a fraction or exponent.");
            }

            if (!reader.TryGetInt64(out var value))
            {
                throw new SafeTensorsException(source, name, $"{label} is {text}, larger than the largest supported size {long.MaxValue} ({Where(header, reader.TokenStartIndex)}); the header is corrupt.");
            }

            values.Add(value);
        }

        return [.. values];
    }

    private static void CheckCoverage(List<(SafeTensorInfo Info, long Position)> entries, ReadOnlySpan<byte> header, long bufferLength, string source)
    {
        var sorted = entries.OrderBy(e => e.Info.DataBegin).ThenBy(e => e.Info.DataEnd).ThenBy(e => e.Position).ToList();
        long covered = 0;
        SafeTensorInfo? previous = null;
        foreach (var (tensor, position) in sorted)
        {
            if (tensor.DataBegin < covered)
            {
                throw new SafeTensorsException(
                    source,
                    tensor.Name,
                    $"data_offsets [{tensor.DataBegin}, {tensor.DataEnd}] overlap tensor '{previous!.Name}' [{previous.DataBegin}, {previous.DataEnd}] ({Where(header, position)}); "
                    + "every byte of the buffer must belong to exactly one tensor. The header is corrupt or crafted.");
            }

            if (tensor.DataBegin > covered)
            {
                var after = previous is null ? "at the start of the buffer" : $"after tensor '{previous.Name}'";
                throw new SafeTensorsException(
                    source,
                    tensor.Name,
                    $"bytes [{covered}, {tensor.DataBegin}) of the byte buffer, {after}, belong to no tensor ({Where(header, position)}); "
                    + "the format requires the buffer to be fully covered with no holes. The header is corrupt or crafted.");
            }

            covered = tensor.DataEnd;
            previous = tensor;
        }

        if (covered != bufferLength)
        {
            throw new SafeTensorsException(
                source,
                null,
                $"the last {bufferLength - covered} bytes of the {bufferLength}-byte buffer (from buffer offset {covered}) belong to no tensor; "
                + "the format requires the buffer to be fully covered with no trailing data. The file has extra bytes or the header is wrong.");
        }
    }

    private static string Where(ReadOnlySpan<byte> header, long index)
    {
        var before = header[..(int)Math.Min(index, header.Length)];
        var line = before.Count((byte)'\n') + 1;
        var column = before.Length - before.LastIndexOf((byte)'\n');
        return $"header line {line}, column {column}";
    }

    private static int FirstInvalidUtf8(ReadOnlySpan<byte> bytes)
    {
        var index = 0;
        while (index < bytes.Length)
        {
            if (System.Text.Rune.DecodeFromUtf8(bytes[index..], out _, out var consumed) != System.Buffers.OperationStatus.Done)
            {
                return index;
            }

            index += consumed;
        }

        return index;
    }

    private static string Kind(JsonTokenType type) => type switch
    {
        JsonTokenType.String => "a string",
        JsonTokenType.Number => "a number",
        JsonTokenType.StartObject => "an object",
        JsonTokenType.StartArray => "an array",
        JsonTokenType.True or JsonTokenType.False => "a boolean",
        JsonTokenType.Null => "null",
        _ => type.ToString(),
    };

    private static string TrimReaderMessage(string message)
    {
        var cut = message.IndexOf(" LineNumber:", StringComparison.Ordinal);
        var text = (cut >= 0 ? message[..cut] : message).Replace(" Change the reader options.", string.Empty, StringComparison.Ordinal).TrimEnd();
        return text.EndsWith('.') ? text : text + ".";
    }
}
