using System.Buffers.Binary;
using System.Runtime.InteropServices;
using System.Security.Cryptography;
using System.Text;

namespace TaskPhrase.Resolution.Scoring;

/// <summary>
/// The byte layout shared by the serialised scorers: a 4-byte ASCII magic, a little-endian u16 format version, the
/// payload (little-endian numbers), and a SHA-256 over everything before it as the last 32 bytes.
/// </summary>
internal static class ScorerBytes
{
    public const int HashLength = 32;

    /// <summary>Builds a blob: magic, version, payload, SHA-256.</summary>
    public sealed class Writer(string magic, ushort version)
    {
        private readonly MemoryStream _stream = Start(magic, version);

        private static MemoryStream Start(string magic, ushort version)
        {
            var s = new MemoryStream();
            s.Write(Encoding.ASCII.GetBytes(magic));
            Span<byte> v = stackalloc byte[2];
            BinaryPrimitives.WriteUInt16LittleEndian(v, version);
            s.Write(v);
            return s;
        }

        public void Int32(int value)
        {
            Span<byte> b = stackalloc byte[4];
            BinaryPrimitives.WriteInt32LittleEndian(b, value);
            _stream.Write(b);
        }

        public void Double(double value)
        {
            Span<byte> b = stackalloc byte[8];
            BinaryPrimitives.WriteDoubleLittleEndian(b, value);
            _stream.Write(b);
        }

        public void Floats(ReadOnlySpan<float> values)
        {
            if (BitConverter.IsLittleEndian) { _stream.Write(MemoryMarshal.AsBytes(values)); return; }
            Span<byte> b = stackalloc byte[4];
            foreach (float f in values)
            {
                BinaryPrimitives.WriteSingleLittleEndian(b, f);
                _stream.Write(b);
            }
        }

        public void Bytes(ReadOnlySpan<byte> values)
        {
            Int32(values.Length);
            _stream.Write(values);
        }

        public byte[] Finish()
        {
            var body = _stream.ToArray();
            var result = new byte[body.Length + HashLength];
            body.CopyTo(result, 0);
            SHA256.HashData(body, result.AsSpan(body.Length));
            return result;
        }
    }

    /// <summary>Reads a blob after checking its magic, version, length and SHA-256.</summary>
    public ref struct Reader
    {
        private readonly ReadOnlySpan<byte> _body;
        private readonly string _what;
        private int _pos;

        public Reader(ReadOnlySpan<byte> bytes, string magic, ushort version, string what)
        {
            _what = what;
            int header = magic.Length + 2;
            if (bytes.Length < header + HashLength)
                throw new FormatException($"The {what} data is {bytes.Length} bytes long, too short to hold a header and its SHA-256; it is truncated or not {what} data.");
            if (!bytes[..magic.Length].SequenceEqual(Encoding.ASCII.GetBytes(magic)))
                throw new FormatException($"The {what} data does not start with the magic '{magic}' (bytes 0–{magic.Length - 1}); it is not {what} data.");
            ushort found = BinaryPrimitives.ReadUInt16LittleEndian(bytes[magic.Length..]);
            if (found != version)
                throw new FormatException($"The {what} data has format version {found} (byte {magic.Length}); this library reads version {version}. Rebuild the index with this version.");
            _body = bytes[..^HashLength];
            Span<byte> hash = stackalloc byte[HashLength];
            SHA256.HashData(_body, hash);
            if (!hash.SequenceEqual(bytes[^HashLength..]))
                throw new FormatException($"The {what} data fails its SHA-256 check (last {HashLength} bytes); it is corrupt. Rebuild the index.");
            _pos = header;
        }

        private ReadOnlySpan<byte> Take(int count)
        {
            if (count < 0 || _pos + count > _body.Length)
                throw new FormatException($"The {_what} data ends early: {count} more bytes needed at byte {_pos}, {_body.Length - _pos} left.");
            var s = _body.Slice(_pos, count);
            _pos += count;
            return s;
        }

        public int Int32() => BinaryPrimitives.ReadInt32LittleEndian(Take(4));

        public double Double() => BinaryPrimitives.ReadDoubleLittleEndian(Take(8));

        public float[] Floats(int count)
        {
            if (count < 0 || count > (_body.Length - _pos) / 4)
                throw new FormatException($"The {_what} data claims {count} floats at byte {_pos}, but only {(_body.Length - _pos) / 4} fit.");
            var s = Take(count * 4);
            var result = new float[count];
            if (BitConverter.IsLittleEndian) { s.CopyTo(MemoryMarshal.AsBytes(result.AsSpan())); return result; }
            for (int i = 0; i < count; i++) result[i] = BinaryPrimitives.ReadSingleLittleEndian(s[(i * 4)..]);
            return result;
        }

        public ReadOnlySpan<byte> Bytes() => Take(Int32());

        /// <summary>Checks that every byte was read.</summary>
        public readonly void End()
        {
            if (_pos != _body.Length)
                throw new FormatException($"The {_what} data has {_body.Length - _pos} unexpected bytes after byte {_pos}.");
        }
    }

    /// <summary>SHA-256 (lower-case hex) over the training inputs of a scorer.</summary>
    public static string Digest(string kind, ReadOnlySpan<float> vectors, ReadOnlySpan<int> labels, ReadOnlySpan<double> settings)
    {
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        hash.AppendData(Encoding.UTF8.GetBytes(kind));
        Span<byte> b = stackalloc byte[8];
        BinaryPrimitives.WriteInt32LittleEndian(b, vectors.Length);
        hash.AppendData(b[..4]);
        if (BitConverter.IsLittleEndian) hash.AppendData(MemoryMarshal.AsBytes(vectors));
        else foreach (float f in vectors) { BinaryPrimitives.WriteSingleLittleEndian(b, f); hash.AppendData(b[..4]); }
        BinaryPrimitives.WriteInt32LittleEndian(b, labels.Length);
        hash.AppendData(b[..4]);
        foreach (int l in labels) { BinaryPrimitives.WriteInt32LittleEndian(b, l); hash.AppendData(b[..4]); }
        foreach (double d in settings) { BinaryPrimitives.WriteDoubleLittleEndian(b, d); hash.AppendData(b); }
        return Convert.ToHexStringLower(hash.GetHashAndReset());
    }
}
