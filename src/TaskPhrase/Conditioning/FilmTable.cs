using System.Buffers.Binary;
using System.Security.Cryptography;

namespace TaskPhrase.Conditioning;

/// <summary>
/// The precomputed FiLM conditioning of every approved phrase. Because the conditioning input is always
/// the embedding of an approved phrase (never of the raw utterance), the set of conditioning vectors is
/// finite: it is computed once when an index is built, hashed, and shipped inside the index, so a decoder
/// only ever receives vectors that were reviewed with the registry. Immutable and thread-safe.
/// </summary>
/// <remarks>
/// Binary form (<see cref="ToBytes"/>), all numbers little-endian:
/// <code>
/// offset  size       field
/// 0       8          magic "TPFILMTB"
/// 8       4          u32 format version (1)
/// 12      4          u32 flags (bit 0: the generator uses residual γ; other bits 0)
/// 16      4          u32 E, the embedding width
/// 20      4          u32 R, the number of phrase rows
/// 24      4          u32 L, the number of layers
/// 28      4·L        u32 width of each layer
/// 28+4L   32         SHA-256 of the generator file
/// …       4·R·Σ2w    float32 values; row by row, and within a row layer by layer, γ then β
/// end−32  32         SHA-256 of every byte before it
/// </code>
/// The trailing hash detects corruption and edits made without recomputing it; it is not a signature.
/// </remarks>
public sealed class FilmTable
{
    /// <summary>The format version written by <see cref="ToBytes"/> and the only one read.</summary>
    public const int FormatVersion = 1;

    private const string DefaultSourceName = "FiLM table";
    private const int HashBytes = 32;
    private const int FixedHeaderBytes = 28;
    private static readonly byte[] Magic = "TPFILMTB"u8.ToArray();

    private readonly FilmConditioning[] rows;
    private readonly byte[] bytes;

    private FilmTable(FilmConditioning[] rows, int embeddingDimensions, bool residual, string generatorSha256, int[] widths, byte[] bytes)
    {
        this.rows = rows;
        this.bytes = bytes;
        EmbeddingDimensions = embeddingDimensions;
        Residual = residual;
        GeneratorSha256 = generatorSha256;
        LayerWidths = Array.AsReadOnly(widths);
        Sha256 = Convert.ToHexStringLower(bytes.AsSpan(bytes.Length - HashBytes));
    }

    /// <summary>Number of phrase rows.</summary>
    public int RowCount => rows.Length;

    /// <summary>E, the width of the embeddings the table was computed from.</summary>
    public int EmbeddingDimensions { get; }

    /// <summary>Whether the generator used residual γ (informational; the stored γ already includes it).</summary>
    public bool Residual { get; }

    /// <summary>SHA-256 of the generator file the table was computed with, lower-case hex.</summary>
    public string GeneratorSha256 { get; }

    /// <summary>The width of each conditioned layer, layer 0 first.</summary>
    public IReadOnlyList<int> LayerWidths { get; }

    /// <summary>SHA-256 of the table's binary form (the trailing hash stored in it), lower-case hex.</summary>
    public string Sha256 { get; }

    /// <summary>Computes the conditioning of every phrase embedding.</summary>
    /// <param name="generator">The FiLM generator.</param>
    /// <param name="phraseEmbeddings">The approved phrases' embeddings, row-major: row i is phrase i.</param>
    /// <param name="dimensions">The embedding width; must equal the generator's <see cref="FilmGenerator.EmbeddingDimensions"/>.</param>
    /// <returns>The table.</returns>
    /// <exception cref="ArgumentException">Widths disagree, the span is not a whole number of rows, it is empty, or an embedding is not finite.</exception>
    public static FilmTable Build(FilmGenerator generator, ReadOnlySpan<float> phraseEmbeddings, int dimensions)
    {
        ArgumentNullException.ThrowIfNull(generator);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(dimensions);
        if (dimensions != generator.EmbeddingDimensions)
        {
            throw new ArgumentException($"The embeddings have {dimensions} dimensions; the FiLM generator {generator.SourceName} expects {generator.EmbeddingDimensions}.", nameof(dimensions));
        }

        if (phraseEmbeddings.IsEmpty || phraseEmbeddings.Length % dimensions != 0)
        {
            throw new ArgumentException($"phraseEmbeddings has {phraseEmbeddings.Length} values, not a positive whole number of {dimensions}-dimensional rows.", nameof(phraseEmbeddings));
        }

        var rows = new FilmConditioning[phraseEmbeddings.Length / dimensions];
        for (var r = 0; r < rows.Length; r++)
        {
            try
            {
                rows[r] = generator.Compute(phraseEmbeddings.Slice(r * dimensions, dimensions));
            }
            catch (ArgumentException ex)
            {
                throw new ArgumentException($"Phrase row {r}: {ex.Message}", nameof(phraseEmbeddings), ex);
            }
        }

        var widths = generator.LayerWidths.ToArray();
        var generatorHash = Convert.FromHexString(generator.Sha256);
        var bytes = Serialize(rows, dimensions, generator.Residual, widths, generatorHash);
        return new FilmTable(rows, dimensions, generator.Residual, generator.Sha256, widths, bytes);
    }

    /// <summary>Reads and verifies a table written by <see cref="ToBytes"/>.</summary>
    /// <param name="bytes">The binary form.</param>
    /// <param name="expectedGeneratorSha256">When given, the table must have been computed with this generator file (hex SHA-256).</param>
    /// <param name="sourceName">Where the bytes came from (e.g. the index path and section), used in error messages.</param>
    /// <returns>The table.</returns>
    /// <exception cref="InvalidDataException">Wrong magic, version or size, a hash mismatch (tampering or corruption), a non-finite value, or another generator.</exception>
    public static FilmTable FromBytes(ReadOnlySpan<byte> bytes, string? expectedGeneratorSha256 = null, string sourceName = DefaultSourceName)
    {
        ArgumentNullException.ThrowIfNull(sourceName);
        if (bytes.Length < Magic.Length + 8 || !bytes[..Magic.Length].SequenceEqual(Magic))
        {
            throw Invalid(sourceName, "the data does not start with the FiLM table magic \"TPFILMTB\"; it is not a FiLM table. Rebuild the index.");
        }

        var version = BinaryPrimitives.ReadUInt32LittleEndian(bytes[8..]);
        if (version != FormatVersion)
        {
            throw Invalid(sourceName, $"the table has format version {version}; this library reads version {FormatVersion}. Rebuild the index with this version.");
        }

        if (bytes.Length < FixedHeaderBytes + HashBytes + HashBytes)
        {
            throw Invalid(sourceName, $"the table is {bytes.Length} bytes, too short for a FiLM table; it is truncated. Rebuild the index.");
        }

        var body = bytes[..^HashBytes];
        Span<byte> actual = stackalloc byte[HashBytes];
        SHA256.HashData(body, actual);
        if (!actual.SequenceEqual(bytes[^HashBytes..]))
        {
            throw Invalid(sourceName, $"the table fails its SHA-256 check (stored {Convert.ToHexStringLower(bytes[^HashBytes..])}, computed {Convert.ToHexStringLower(actual)}); it was modified or damaged. Rebuild the index.");
        }

        var flags = BinaryPrimitives.ReadUInt32LittleEndian(bytes[12..]);
        var dimensions = BinaryPrimitives.ReadUInt32LittleEndian(bytes[16..]);
        var rowCount = BinaryPrimitives.ReadUInt32LittleEndian(bytes[20..]);
        var layerCount = BinaryPrimitives.ReadUInt32LittleEndian(bytes[24..]);
        if ((flags & ~1u) != 0 || dimensions is 0 or > int.MaxValue || rowCount is 0 or > int.MaxValue || layerCount is 0 or > 1_000_000)
        {
            throw Invalid(sourceName, $"the table has an impossible header (flags {flags}, E {dimensions}, rows {rowCount}, layers {layerCount}). Rebuild the index.");
        }

        long headerBytes = FixedHeaderBytes + (4L * layerCount) + HashBytes;
        if (headerBytes > body.Length)
        {
            throw Invalid(sourceName, $"the table declares {layerCount} layers but is only {bytes.Length} bytes long. Rebuild the index.");
        }

        var widths = new int[layerCount];
        long rowFloats = 0;
        for (var l = 0; l < widths.Length; l++)
        {
            var width = BinaryPrimitives.ReadUInt32LittleEndian(bytes[(FixedHeaderBytes + (4 * l))..]);
            if (width is 0 or > int.MaxValue)
            {
                throw Invalid(sourceName, $"the table declares width {width} for layer {l}. Rebuild the index.");
            }

            widths[l] = (int)width;
            rowFloats += 2L * width;
        }

        long expectedLength;
        try
        {
            expectedLength = checked(headerBytes + (4 * rowFloats * rowCount) + HashBytes);
        }
        catch (OverflowException)
        {
            expectedLength = long.MaxValue;
        }

        if (expectedLength != bytes.Length)
        {
            throw Invalid(sourceName, $"the table is {bytes.Length} bytes but its header describes {expectedLength}. Rebuild the index.");
        }

        var generatorSha = Convert.ToHexStringLower(bytes.Slice((int)headerBytes - HashBytes, HashBytes));
        if (expectedGeneratorSha256 is not null && !string.Equals(expectedGeneratorSha256, generatorSha, StringComparison.OrdinalIgnoreCase))
        {
            throw Invalid(sourceName, $"the table was computed with the FiLM generator {generatorSha}, not with the expected {expectedGeneratorSha256.ToLowerInvariant()}. Rebuild the index with the generator in use.");
        }

        var rows = new FilmConditioning[rowCount];
        var position = (int)headerBytes;
        for (var r = 0; r < rows.Length; r++)
        {
            var layers = new FilmLayer[widths.Length];
            for (var l = 0; l < widths.Length; l++)
            {
                var gamma = ReadFloats(bytes, ref position, widths[l]);
                var beta = ReadFloats(bytes, ref position, widths[l]);
                try
                {
                    layers[l] = FilmLayer.Wrap(gamma, beta);
                }
                catch (ArgumentException ex)
                {
                    throw Invalid(sourceName, $"row {r}, layer {l}: {ex.Message} Rebuild the index.");
                }
            }

            rows[r] = new FilmConditioning(layers);
        }

        return new FilmTable(rows, (int)dimensions, (flags & 1) != 0, generatorSha, widths, bytes.ToArray());
    }

    /// <summary>The conditioning of one phrase row (the same instance on every call).</summary>
    /// <param name="phraseRow">The row, from 0, in the order the embeddings were given to <see cref="Build"/>.</param>
    /// <returns>The conditioning.</returns>
    /// <exception cref="ArgumentOutOfRangeException">No such row.</exception>
    public FilmConditioning Get(int phraseRow)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(phraseRow);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(phraseRow, rows.Length);
        return rows[phraseRow];
    }

    /// <summary>The binary form described in the remarks (a fresh copy on every call).</summary>
    /// <returns>The bytes, ending with their SHA-256.</returns>
    public byte[] ToBytes() => (byte[])bytes.Clone();

    /// <inheritdoc />
    public override string ToString() => $"FiLM table, {RowCount} rows, layer widths [{string.Join(", ", LayerWidths)}], sha256 {Sha256[..12]}…";

    private static byte[] Serialize(FilmConditioning[] rows, int dimensions, bool residual, int[] widths, byte[] generatorHash)
    {
        var rowFloats = widths.Sum(w => 2L * w);
        var length = checked((int)(FixedHeaderBytes + (4L * widths.Length) + HashBytes + (4L * rowFloats * rows.Length) + HashBytes));
        var result = new byte[length];
        var span = result.AsSpan();
        Magic.CopyTo(span);
        BinaryPrimitives.WriteUInt32LittleEndian(span[8..], FormatVersion);
        BinaryPrimitives.WriteUInt32LittleEndian(span[12..], residual ? 1u : 0u);
        BinaryPrimitives.WriteUInt32LittleEndian(span[16..], (uint)dimensions);
        BinaryPrimitives.WriteUInt32LittleEndian(span[20..], (uint)rows.Length);
        BinaryPrimitives.WriteUInt32LittleEndian(span[24..], (uint)widths.Length);
        var position = FixedHeaderBytes;
        foreach (var width in widths)
        {
            BinaryPrimitives.WriteUInt32LittleEndian(span[position..], (uint)width);
            position += 4;
        }

        generatorHash.CopyTo(span[position..]);
        position += HashBytes;
        foreach (var row in rows)
        {
            foreach (var layer in row.Layers)
            {
                WriteFloats(span, ref position, layer.Gamma.Span);
                WriteFloats(span, ref position, layer.Beta.Span);
            }
        }

        SHA256.HashData(span[..position], span[position..]);
        return result;
    }

    private static void WriteFloats(Span<byte> span, ref int position, ReadOnlySpan<float> values)
    {
        foreach (var value in values)
        {
            BinaryPrimitives.WriteSingleLittleEndian(span[position..], value);
            position += 4;
        }
    }

    private static float[] ReadFloats(ReadOnlySpan<byte> bytes, ref int position, int count)
    {
        var values = new float[count];
        for (var i = 0; i < count; i++)
        {
            values[i] = BinaryPrimitives.ReadSingleLittleEndian(bytes[position..]);
            position += 4;
        }

        return values;
    }

    private static InvalidDataException Invalid(string sourceName, string message) => new($"{sourceName}: {message}");
}
