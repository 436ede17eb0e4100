using System.Buffers.Binary;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json.Nodes;

namespace TaskPhrase.Tests.Registry;

/// <summary>
/// The test's own reader and editor of the index layout, written from the format description in the TaskIndex
/// docs (magic, version, header length, header JSON, 8-aligned data region, trailing SHA-256), so tests can point at
/// each region and forge files that pass some checks and must fail a later one.
/// </summary>
internal sealed class IndexFileLayout
{
    public IndexFileLayout(byte[] file)
    {
        File = file;
        HeaderLength = (int)BinaryPrimitives.ReadUInt32LittleEndian(file.AsSpan(12));
        Header = JsonNode.Parse(Encoding.UTF8.GetString(file, 16, HeaderLength))!.AsObject();
        DataStart = (16 + HeaderLength + 7) / 8 * 8;
    }

    public byte[] File { get; }
    public int HeaderLength { get; }
    public JsonObject Header { get; }
    public int DataStart { get; }
    public int ChecksumStart => File.Length - 32;

    /// <summary>File offset and length of a block ("registry", "embeddings") or section.</summary>
    public (int Offset, int Length) Region(string name)
    {
        foreach (var list in new[] { "blocks", "sections" })
        {
            foreach (var entry in Header[list]!.AsArray())
            {
                if ((string)entry!["name"]! == name)
                    return (DataStart + (int)(long)entry["offset"]!, (int)(long)entry["length"]!);
            }
        }
        throw new KeyNotFoundException(name);
    }

    /// <summary>Recomputes the trailing SHA-256 so that only the deeper checks can catch an edit.</summary>
    public static byte[] Reseal(byte[] file)
    {
        var copy = (byte[])file.Clone();
        SHA256.HashData(copy.AsSpan(0, copy.Length - 32), copy.AsSpan(copy.Length - 32));
        return copy;
    }

    /// <summary>Rebuilds the file with an edited header (same data region) and a fresh trailing checksum.</summary>
    public byte[] WithHeader(Action<JsonObject> edit)
    {
        var header = JsonNode.Parse(Header.ToJsonString())!.AsObject();
        edit(header);
        byte[] json = Encoding.UTF8.GetBytes(header.ToJsonString());
        int dataStart = (16 + json.Length + 7) / 8 * 8;
        int dataLength = ChecksumStart - DataStart;
        var file = new byte[dataStart + dataLength + 32];
        File.AsSpan(0, 12).CopyTo(file);
        BinaryPrimitives.WriteUInt32LittleEndian(file.AsSpan(12), (uint)json.Length);
        json.CopyTo(file, 16);
        File.AsSpan(DataStart, dataLength).CopyTo(file.AsSpan(dataStart));
        return Reseal(file);
    }

    /// <summary>Replaces a block's bytes in place (same length), fixing its SHA-256 in the header and the trailer.</summary>
    public byte[] WithBlockBytes(string name, byte[] replacement)
    {
        var (offset, length) = Region(name);
        if (replacement.Length != length) throw new ArgumentException("same length only");
        var edited = new IndexFileLayout((byte[])File.Clone());
        replacement.CopyTo(edited.File, offset);
        string sha = Convert.ToHexStringLower(SHA256.HashData(replacement));
        return edited.WithHeader(h =>
        {
            foreach (var entry in h["blocks"]!.AsArray().Concat(h["sections"]!.AsArray()))
                if ((string)entry!["name"]! == name) entry["sha256"] = sha;
        });
    }
}
