using System.Buffers.Binary;
using System.Globalization;
using System.Text;

namespace TaskPhrase.Conditioning;

/// <summary>
/// Builds a safetensors file in the canonical form the reference implementation writes
/// (huggingface/safetensors, <c>serialize</c> in <c>safetensors/src/tensor.rs</c>): tensors laid out by
/// descending dtype alignment, then by name (Unicode code point order); the header is compact JSON with
/// <c>__metadata__</c> first (its keys sorted), then the tensors in buffer order, each as
/// <c>{"dtype":…,"shape":[…],"data_offsets":[begin,end]}</c>; the header is padded with spaces to a multiple
/// of 8 bytes so every tensor's data is 8-byte aligned. Equal content always gives identical bytes.
/// </summary>
/// <remarks>A builder: not thread-safe. Data is copied when added, so the caller may reuse its buffers.</remarks>
public sealed class SafeTensorsWriter
{
    private readonly Dictionary<string, Entry> tensors = new(StringComparer.Ordinal);
    private readonly Dictionary<string, string> metadata = new(StringComparer.Ordinal);

    /// <summary>Number of tensors added so far.</summary>
    public int Count => tensors.Count;

    /// <summary>Adds a float32 tensor.</summary>
    /// <param name="name">Unique tensor name; not <c>__metadata__</c>.</param>
    /// <param name="values">The elements, row-major.</param>
    /// <param name="shape">The dimensions; their product must equal the number of values.</param>
    /// <returns>This writer.</returns>
    /// <exception cref="ArgumentException">Bad or duplicate name, negative dimension, or wrong number of values.</exception>
    public SafeTensorsWriter AddFloat32(string name, ReadOnlySpan<float> values, params ReadOnlySpan<long> shape)
    {
        var bytes = new byte[checked(values.Length * sizeof(float))];
        for (var i = 0; i < values.Length; i++)
        {
            BinaryPrimitives.WriteSingleLittleEndian(bytes.AsSpan(4 * i), values[i]);
        }

        return Add(name, SafeTensorsDType.F32, shape, bytes);
    }

    /// <summary>Adds a tensor of any dtype from its raw little-endian bytes.</summary>
    /// <param name="name">Unique tensor name; not <c>__metadata__</c>.</param>
    /// <param name="dtype">The element type.</param>
    /// <param name="shape">The dimensions.</param>
    /// <param name="data">Exactly product(shape) × element size bytes.</param>
    /// <returns>This writer.</returns>
    /// <exception cref="ArgumentException">Bad or duplicate name, negative dimension, or wrong data length.</exception>
    public SafeTensorsWriter AddTensor(string name, SafeTensorsDType dtype, ReadOnlySpan<long> shape, ReadOnlySpan<byte> data)
        => Add(name, dtype, shape, data.ToArray());

    /// <summary>Adds or replaces one <c>__metadata__</c> entry.</summary>
    /// <param name="key">The key.</param>
    /// <param name="value">The value.</param>
    /// <returns>This writer.</returns>
    public SafeTensorsWriter SetMetadata(string key, string value)
    {
        ArgumentNullException.ThrowIfNull(key);
        ArgumentNullException.ThrowIfNull(value);
        metadata[key] = value;
        return this;
    }

    /// <summary>Serialises everything added so far.</summary>
    /// <returns>The complete file.</returns>
    public byte[] ToArray()
    {
        using var stream = new MemoryStream();
        WriteTo(stream);
        return stream.ToArray();
    }

    /// <summary>Writes the file to a stream (from its current position).</summary>
    /// <param name="destination">A writable stream; not disposed.</param>
    public void WriteTo(Stream destination)
    {
        ArgumentNullException.ThrowIfNull(destination);
        var ordered = tensors.Values
            .OrderByDescending(e => e.DType)
            .ThenBy(e => e.Name, CodePointComparer.Instance)
            .ToList();
        var header = BuildHeader(ordered);
        Span<byte> prefix = stackalloc byte[8];
        BinaryPrimitives.WriteUInt64LittleEndian(prefix, (ulong)header.Length);
        destination.Write(prefix);
        destination.Write(header);
        foreach (var entry in ordered)
        {
            destination.Write(entry.Data);
        }
    }

    /// <summary>Writes the file to <paramref name="path"/> through a temporary file in the same folder, so a reader never sees half a file.</summary>
    /// <param name="path">The destination; replaced if it exists.</param>
    public void Save(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        var full = Path.GetFullPath(path);
        var temp = full + "." + Environment.ProcessId.ToString(CultureInfo.InvariantCulture) + ".tmp";
        try
        {
            using (var stream = new FileStream(temp, FileMode.Create, FileAccess.Write, FileShare.None))
            {
                WriteTo(stream);
                stream.Flush(flushToDisk: true);
            }

            File.Move(temp, full, overwrite: true);
        }
        finally
        {
            if (File.Exists(temp))
            {
                File.Delete(temp);
            }
        }
    }

    private SafeTensorsWriter Add(string name, SafeTensorsDType dtype, ReadOnlySpan<long> shape, byte[] data)
    {
        ArgumentException.ThrowIfNullOrEmpty(name);
        if (name == SafeTensorsHeader.MetadataKey)
        {
            throw new ArgumentException($"'{SafeTensorsHeader.MetadataKey}' is reserved for metadata and cannot name a tensor.", nameof(name));
        }

        if (tensors.ContainsKey(name))
        {
            throw new ArgumentException($"A tensor named '{name}' was already added.", nameof(name));
        }

        long elements = 1;
        foreach (var dimension in shape)
        {
            ArgumentOutOfRangeException.ThrowIfNegative(dimension, nameof(shape));
            elements = checked(elements * dimension);
        }

        var expected = checked(elements * SafeTensorsDTypes.Size(dtype));
        if (data.Length != expected)
        {
            throw new ArgumentException(
                $"Tensor '{name}' with shape {SafeTensorInfo.FormatShape(shape.ToArray())} of {SafeTensorsDTypes.Name(dtype)} needs {expected} bytes; {data.Length} were given.",
                nameof(data));
        }

        tensors.Add(name, new Entry(name, dtype, shape.ToArray(), data));
        return this;
    }

    private byte[] BuildHeader(List<Entry> ordered)
    {
        var json = new StringBuilder("{");
        var first = true;
        if (metadata.Count > 0)
        {
            json.Append('"').Append(SafeTensorsHeader.MetadataKey).Append("\":{");
            var firstKey = true;
            foreach (var key in metadata.Keys.OrderBy(k => k, CodePointComparer.Instance))
            {
                json.Append(firstKey ? string.Empty : ",");
                AppendString(json, key);
                json.Append(':');
                AppendString(json, metadata[key]);
                firstKey = false;
            }

            json.Append('}');
            first = false;
        }

        long offset = 0;
        foreach (var entry in ordered)
        {
            json.Append(first ? string.Empty : ",");
            AppendString(json, entry.Name);
            json.Append(":{\"dtype\":\"").Append(SafeTensorsDTypes.Name(entry.DType)).Append("\",\"shape\":[");
            json.AppendJoin(',', entry.Shape.Select(d => d.ToString(CultureInfo.InvariantCulture)));
            var end = offset + entry.Data.Length;
            json.Append("],\"data_offsets\":[")
                .Append(offset.ToString(CultureInfo.InvariantCulture)).Append(',')
                .Append(end.ToString(CultureInfo.InvariantCulture)).Append("]}");
            offset = end;
            first = false;
        }

        json.Append('}');
        var length = Encoding.UTF8.GetByteCount(json.ToString());
        json.Append(' ', (8 - (length % 8)) % 8);
        return Encoding.UTF8.GetBytes(json.ToString());
    }

    /// <summary>JSON string escaping as serde_json writes it: quote, backslash and control characters only; everything else as UTF-8.</summary>
    private static void AppendString(StringBuilder json, string value)
    {
        json.Append('"');
        foreach (var c in value)
        {
            switch (c)
            {
                case '"': json.Append("\\\""); break;
                case '\\': json.Append("\\\\"); break;
                case '\b': json.Append("\\b"); break;
                case '\f': json.Append("\\f"); break;
                case '\n': json.Append("\\n"); break;
                case '\r': json.Append("\\r"); break;
                case '\t': json.Append("\\t"); break;
                case < ' ': json.Append("\\u00").Append(((int)c).ToString("x2", CultureInfo.InvariantCulture)); break;
                default: json.Append(c); break;
            }
        }

        json.Append('"');
    }

    private sealed record Entry(string Name, SafeTensorsDType DType, long[] Shape, byte[] Data);

    /// <summary>Orders strings by Unicode code point (the order of their UTF-8 bytes), as Rust and Python sort strings.</summary>
    private sealed class CodePointComparer : IComparer<string>
    {
        public static readonly CodePointComparer Instance = new();

        public int Compare(string? x, string? y)
        {
            if (ReferenceEquals(x, y))
            {
                return 0;
            }

            if (x is null || y is null)
            {
                return x is null ? -1 : 1;
            }

            var left = x.EnumerateRunes();
            var right = y.EnumerateRunes();
            while (true)
            {
                var hasLeft = left.MoveNext();
                var hasRight = right.MoveNext();
                if (!hasLeft || !hasRight)
                {
                    return hasLeft.CompareTo(hasRight);
                }

                var order = left.Current.Value.CompareTo(right.Current.Value);
                if (order != 0)
                {
                    return order;
                }
            }
        }
    }
}
