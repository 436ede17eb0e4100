using System.Buffers;
using System.Buffers.Binary;
using System.Runtime.InteropServices;

namespace TaskPhrase.Conditioning;

/// <summary>
/// A validated safetensors file (the open tensor format: an 8-byte little-endian header length N,
/// N bytes of UTF-8 JSON header, then the raw little-endian byte buffer). Opening reads and checks only the
/// header against the file size; tensor data is read on request, one tensor at a time, so memory stays
/// bounded by what is asked for. Everything malformed is refused with a <see cref="SafeTensorsException"/>
/// naming the file and the tensor.
/// </summary>
/// <remarks>
/// Thread safety: after opening, all members may be called from several threads at once (files use
/// positional reads, streams are read under a lock). <see cref="Dispose"/> must not race with reads.
/// Ownership: the instance owns the file handle, and the stream unless <c>leaveOpen</c> was given.
/// </remarks>
public sealed class SafeTensorsFile : IDisposable
{
    /// <summary>The largest header accepted by default: 100,000,000 bytes, the limit of the reference implementation.</summary>
    public const long DefaultMaxHeaderBytes = 100_000_000;

    private const int ConversionChunkBytes = 64 * 1024;

    private readonly SafeTensorsSource source;
    private readonly SafeTensorsHeader header;
    private int disposed;

    private SafeTensorsFile(SafeTensorsSource source, string sourceName, long maxHeaderBytes)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(maxHeaderBytes);
        this.source = source;
        SourceName = sourceName;
        Length = source.Length;
        if (Length < 8)
        {
            throw new SafeTensorsException(sourceName, null, $"the file is {Length} bytes long, shorter than the 8-byte header length that starts every safetensors file; it is truncated or not a safetensors file.");
        }

        Span<byte> prefix = stackalloc byte[8];
        source.ReadExactlyAt(0, prefix, sourceName, null);
        var declared = BinaryPrimitives.ReadUInt64LittleEndian(prefix);
        if (declared > (ulong)maxHeaderBytes)
        {
            throw new SafeTensorsException(sourceName, null, $"the header length prefix says {declared} bytes, more than the limit of {maxHeaderBytes} bytes{TextHint(prefix)}; the file is corrupt or not a safetensors file.");
        }

        if (declared > (ulong)(Length - 8))
        {
            throw new SafeTensorsException(sourceName, null, $"the header length prefix says {declared} bytes but only {Length - 8} bytes follow it{TextHint(prefix)}; the file is truncated or not a safetensors file.");
        }

        HeaderLength = (long)declared;
        var headerBytes = new byte[HeaderLength];
        source.ReadExactlyAt(8, headerBytes, sourceName, null);
        header = SafeTensorsHeader.Parse(headerBytes, Length - DataStart, sourceName);
    }

    /// <summary>The file path, or the name given for a stream or buffer; used in every error message.</summary>
    public string SourceName { get; }

    /// <summary>Total length of the file in bytes, as found when it was opened.</summary>
    public long Length { get; }

    /// <summary>Length of the JSON header in bytes (N), including any trailing padding.</summary>
    public long HeaderLength { get; }

    /// <summary>Position of the byte buffer in the file: 8 + <see cref="HeaderLength"/>.</summary>
    public long DataStart => 8 + HeaderLength;

    /// <summary>The tensors, in the order of their data in the byte buffer.</summary>
    public IReadOnlyList<SafeTensorInfo> Tensors => header.Tensors;

    /// <summary>The header's <c>__metadata__</c> string-to-string map; empty when absent.</summary>
    public IReadOnlyDictionary<string, string> Metadata => header.Metadata;

    /// <summary>Opens and validates a safetensors file. The file stays open (shared for reading) until disposed.</summary>
    /// <param name="path">The file.</param>
    /// <param name="maxHeaderBytes">Largest header accepted; larger ones are refused before anything is allocated.</param>
    /// <returns>The validated file.</returns>
    /// <exception cref="SafeTensorsException">The file is not a well-formed safetensors file.</exception>
    /// <exception cref="IOException">The file cannot be opened or read (including <see cref="FileNotFoundException"/>).</exception>
    public static SafeTensorsFile Open(string path, long maxHeaderBytes = DefaultMaxHeaderBytes)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        var handle = File.OpenHandle(path, FileMode.Open, FileAccess.Read, FileShare.Read, FileOptions.RandomAccess);
        return Create(new SafeTensorsSource.FileSource(handle), path, maxHeaderBytes);
    }

    /// <summary>Reads and validates a safetensors file from a readable, seekable stream.</summary>
    /// <param name="stream">The stream; its whole length is the file. Non-seekable streams must be copied to a <see cref="MemoryStream"/> first.</param>
    /// <param name="sourceName">A name for the stream, used in error messages.</param>
    /// <param name="leaveOpen">True to leave the stream open when this instance is disposed.</param>
    /// <param name="maxHeaderBytes">Largest header accepted.</param>
    /// <returns>The validated file.</returns>
    /// <exception cref="SafeTensorsException">The content is not a well-formed safetensors file.</exception>
    /// <exception cref="ArgumentException">The stream cannot be read or cannot seek.</exception>
    public static SafeTensorsFile FromStream(Stream stream, string sourceName, bool leaveOpen = false, long maxHeaderBytes = DefaultMaxHeaderBytes)
    {
        ArgumentNullException.ThrowIfNull(stream);
        ArgumentException.ThrowIfNullOrEmpty(sourceName);
        if (!stream.CanRead || !stream.CanSeek)
        {
            throw new ArgumentException("The stream must be readable and seekable; copy it into a MemoryStream or a file first.", nameof(stream));
        }

        return Create(new SafeTensorsSource.StreamSource(stream, leaveOpen), sourceName, maxHeaderBytes);
    }

    /// <summary>Validates a safetensors file held in memory. The bytes are not copied and must not change while in use.</summary>
    /// <param name="bytes">The whole file.</param>
    /// <param name="sourceName">A name for the bytes, used in error messages.</param>
    /// <param name="maxHeaderBytes">Largest header accepted.</param>
    /// <returns>The validated file.</returns>
    /// <exception cref="SafeTensorsException">The bytes are not a well-formed safetensors file.</exception>
    public static SafeTensorsFile FromBytes(ReadOnlyMemory<byte> bytes, string sourceName, long maxHeaderBytes = DefaultMaxHeaderBytes)
    {
        ArgumentException.ThrowIfNullOrEmpty(sourceName);
        return Create(new SafeTensorsSource.MemorySource(bytes), sourceName, maxHeaderBytes);
    }

    /// <summary>True when the file has a tensor of this name.</summary>
    /// <param name="name">The tensor name.</param>
    /// <returns>Whether it exists.</returns>
    public bool Contains(string name) => header.ByName.ContainsKey(name);

    /// <summary>Looks a tensor up by name.</summary>
    /// <param name="name">The tensor name.</param>
    /// <param name="tensor">The tensor when found.</param>
    /// <returns>Whether it exists.</returns>
    public bool TryGetTensor(string name, [System.Diagnostics.CodeAnalysis.NotNullWhen(true)] out SafeTensorInfo? tensor)
        => header.ByName.TryGetValue(name, out tensor);

    /// <summary>Gets a tensor by name.</summary>
    /// <param name="name">The tensor name.</param>
    /// <returns>The tensor.</returns>
    /// <exception cref="SafeTensorsException">There is no such tensor; the message lists some that exist.</exception>
    public SafeTensorInfo GetTensor(string name)
    {
        ArgumentNullException.ThrowIfNull(name);
        if (header.ByName.TryGetValue(name, out var tensor))
        {
            return tensor;
        }

        const int shown = 8;
        var names = string.Join(", ", Tensors.Take(shown).Select(t => t.Name));
        var more = Tensors.Count > shown ? $" and {Tensors.Count - shown} more" : string.Empty;
        var has = Tensors.Count == 0 ? "the file has no tensors" : $"the file has {names}{more}";
        throw new SafeTensorsException(SourceName, name, $"no such tensor; {has}.");
    }

    /// <summary>Reads a tensor's raw little-endian bytes into a new array.</summary>
    /// <param name="name">The tensor name.</param>
    /// <returns>Exactly <see cref="SafeTensorInfo.ByteLength"/> bytes.</returns>
    /// <exception cref="SafeTensorsException">No such tensor, it is too large for one array, or the file changed while in use.</exception>
    public byte[] ReadBytes(string name)
    {
        var tensor = GetTensor(name);
        var bytes = new byte[CheckedArrayLength(tensor, tensor.ByteLength)];
        ReadBytes(tensor, bytes);
        return bytes;
    }

    /// <summary>Reads a tensor's raw little-endian bytes into <paramref name="destination"/> without allocating.</summary>
    /// <param name="name">The tensor name.</param>
    /// <param name="destination">Exactly <see cref="SafeTensorInfo.ByteLength"/> bytes long.</param>
    /// <exception cref="SafeTensorsException">No such tensor, or the file changed while in use.</exception>
    /// <exception cref="ArgumentException">The destination has the wrong length.</exception>
    public void ReadBytes(string name, Span<byte> destination)
    {
        var tensor = GetTensor(name);
        if (destination.Length != tensor.ByteLength)
        {
            throw new ArgumentException($"Tensor '{name}' has {tensor.ByteLength} bytes; the destination has {destination.Length}.", nameof(destination));
        }

        ReadBytes(tensor, destination);
    }

    /// <summary>Reads an <c>F32</c>, <c>F16</c> or <c>BF16</c> tensor as floats (row-major) into a new array.</summary>
    /// <param name="name">The tensor name.</param>
    /// <returns><see cref="SafeTensorInfo.ElementCount"/> floats.</returns>
    /// <exception cref="SafeTensorsException">No such tensor, another dtype, too large for one array, or the file changed while in use.</exception>
    public float[] ReadFloats(string name)
    {
        var tensor = GetTensor(name);
        CheckFloatType(tensor);
        var values = new float[CheckedArrayLength(tensor, tensor.ElementCount)];
        ReadFloats(tensor, values);
        return values;
    }

    /// <summary>Reads an <c>F32</c>, <c>F16</c> or <c>BF16</c> tensor as floats into <paramref name="destination"/>; F16 and BF16 are widened exactly.</summary>
    /// <param name="name">The tensor name.</param>
    /// <param name="destination">Exactly <see cref="SafeTensorInfo.ElementCount"/> floats long.</param>
    /// <exception cref="SafeTensorsException">No such tensor, another dtype, or the file changed while in use.</exception>
    /// <exception cref="ArgumentException">The destination has the wrong length.</exception>
    public void ReadFloats(string name, Span<float> destination)
    {
        var tensor = GetTensor(name);
        CheckFloatType(tensor);
        if (destination.Length != tensor.ElementCount)
        {
            throw new ArgumentException($"Tensor '{name}' has {tensor.ElementCount} elements; the destination has {destination.Length}.", nameof(destination));
        }

        ReadFloats(tensor, destination);
    }

    /// <summary>Closes the file (or the stream, unless it was left open). Reads afterwards throw <see cref="ObjectDisposedException"/>.</summary>
    public void Dispose()
    {
        if (Interlocked.Exchange(ref disposed, 1) == 0)
        {
            source.Dispose();
        }
    }

    private static SafeTensorsFile Create(SafeTensorsSource source, string sourceName, long maxHeaderBytes)
    {
        try
        {
            return new SafeTensorsFile(source, sourceName, maxHeaderBytes);
        }
        catch
        {
            source.Dispose();
            throw;
        }
    }

    private static string TextHint(ReadOnlySpan<byte> prefix)
    {
        foreach (var b in prefix)
        {
            if (b is < 0x20 or > 0x7E)
            {
                return string.Empty;
            }
        }

        return $" (the first 8 bytes are the text \"{System.Text.Encoding.ASCII.GetString(prefix)}\", not a binary little-endian number)";
    }

    private void ReadBytes(SafeTensorInfo tensor, Span<byte> destination)
    {
        ObjectDisposedException.ThrowIf(Volatile.Read(ref disposed) != 0, this);
        source.ReadExactlyAt(DataStart + tensor.DataBegin, destination, SourceName, tensor.Name);
    }

    private void ReadFloats(SafeTensorInfo tensor, Span<float> destination)
    {
        if (tensor.DType == SafeTensorsDType.F32)
        {
            ReadBytes(tensor, MemoryMarshal.AsBytes(destination));
            if (!BitConverter.IsLittleEndian)
            {
                var bits = MemoryMarshal.Cast<float, int>(destination);
                BinaryPrimitives.ReverseEndianness(bits, bits);
            }

            return;
        }

        ObjectDisposedException.ThrowIf(Volatile.Read(ref disposed) != 0, this);
        var buffer = ArrayPool<byte>.Shared.Rent(ConversionChunkBytes);
        try
        {
            var position = DataStart + tensor.DataBegin;
            var written = 0;
            while (written < destination.Length)
            {
                var count = Math.Min(destination.Length - written, ConversionChunkBytes / 2);
                var chunk = buffer.AsSpan(0, count * 2);
                source.ReadExactlyAt(position, chunk, SourceName, tensor.Name);
                var target = destination.Slice(written, count);
                for (var i = 0; i < count; i++)
                {
                    var raw = BinaryPrimitives.ReadUInt16LittleEndian(chunk[(2 * i)..]);
                    target[i] = tensor.DType == SafeTensorsDType.F16
                        ? (float)BitConverter.UInt16BitsToHalf(raw)
                        : BitConverter.Int32BitsToSingle(raw << 16);
                }

                written += count;
                position += count * 2;
            }
        }
        finally
        {
            ArrayPool<byte>.Shared.Return(buffer);
        }
    }

    private void CheckFloatType(SafeTensorInfo tensor)
    {
        if (tensor.DType is not (SafeTensorsDType.F32 or SafeTensorsDType.F16 or SafeTensorsDType.BF16))
        {
            throw new SafeTensorsException(SourceName, tensor.Name, $"the dtype is {tensor.DTypeName}; only F32, F16 and BF16 tensors can be read as floats. Convert the tensor when exporting it.");
        }
    }

    private int CheckedArrayLength(SafeTensorInfo tensor, long count)
    {
        if (count > Array.MaxLength)
        {
            throw new SafeTensorsException(SourceName, tensor.Name, $"{count} elements are too many to read into one array (at most {Array.MaxLength}).");
        }

        return (int)count;
    }
}
