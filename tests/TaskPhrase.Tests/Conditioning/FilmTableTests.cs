using System.Buffers.Binary;
using System.Security.Cryptography;
using TaskPhrase.Conditioning;

namespace TaskPhrase.Tests.Conditioning;

public class FilmTableTests
{
    // Two phrase rows for the d = 3, E = 4 fixture generator: the hand-computed case of FilmGeneratorTests and
    // a second embedding.
    private static readonly float[] Embeddings = [1, 2, -1, 0.5f, 0, 0.25f, 0.75f, -1];

    [Fact]
    public void Build_EveryRow_EqualsGeneratorCompute()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);

        var table = FilmTable.Build(generator, Embeddings, 4);

        Assert.Equal(2, table.RowCount);
        Assert.Equal(generator.Compute(Embeddings.AsSpan(0, 4)), table.Get(0));
        Assert.Equal(generator.Compute(Embeddings.AsSpan(4, 4)), table.Get(1));
        Assert.Same(table.Get(1), table.Get(1));
        Assert.Equal([1.5f, 1f, 2f], table.Get(0).Layers[0].Gamma.ToArray());
    }

    [Fact]
    public void FromBytes_OwnBytes_RoundTripsEverything()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4-residual.safetensors"), 4);
        var table = FilmTable.Build(generator, Embeddings, 4);

        var copy = FilmTable.FromBytes(table.ToBytes(), generator.Sha256);

        Assert.Equal(table.Get(0), copy.Get(0));
        Assert.Equal(table.Get(1), copy.Get(1));
        Assert.Equal(table.Sha256, copy.Sha256);
        Assert.Equal(generator.Sha256, copy.GeneratorSha256);
        Assert.Equal([3, 3], copy.LayerWidths);
        Assert.True(copy.Residual);
        Assert.Equal(4, copy.EmbeddingDimensions);
        Assert.Equal(table.ToBytes(), copy.ToBytes());
    }

    [Fact]
    public void ToBytes_Layout_IsTheDocumentedLittleEndianForm()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var bytes = FilmTable.Build(generator, Embeddings, 4).ToBytes();

        // 28 fixed + 4·2 widths + 32 generator hash + 2 rows · 2 layers · (3 γ + 3 β) · 4 bytes + 32 table hash.
        Assert.Equal(28 + 8 + 32 + 96 + 32, bytes.Length);
        Assert.Equal("TPFILMTB"u8.ToArray(), bytes[..8]);
        Assert.Equal(1u, BinaryPrimitives.ReadUInt32LittleEndian(bytes.AsSpan(8)));
        Assert.Equal(0u, BinaryPrimitives.ReadUInt32LittleEndian(bytes.AsSpan(12)));
        Assert.Equal(4u, BinaryPrimitives.ReadUInt32LittleEndian(bytes.AsSpan(16)));
        Assert.Equal(2u, BinaryPrimitives.ReadUInt32LittleEndian(bytes.AsSpan(20)));
        Assert.Equal(2u, BinaryPrimitives.ReadUInt32LittleEndian(bytes.AsSpan(24)));
        Assert.Equal(3u, BinaryPrimitives.ReadUInt32LittleEndian(bytes.AsSpan(28)));
        Assert.Equal(3u, BinaryPrimitives.ReadUInt32LittleEndian(bytes.AsSpan(32)));
        Assert.Equal(Fixtures.ReferenceSha256("film-2layer-d3-e4.safetensors"), Convert.ToHexStringLower(bytes.AsSpan(36, 32)));

        // Row 0 starts at 68 with layer 0 γ = [1.5, 1, 2], β = [−1, −1.5, 1] (hand-computed in FilmGeneratorTests).
        float[] row0Layer0 = [1.5f, 1, 2, -1, -1.5f, 1];
        for (var i = 0; i < row0Layer0.Length; i++)
        {
            Assert.Equal(row0Layer0[i], BinaryPrimitives.ReadSingleLittleEndian(bytes.AsSpan(68 + (4 * i))));
        }

        Assert.Equal(SHA256.HashData(bytes.AsSpan(0, bytes.Length - 32)), bytes[^32..]);
    }

    [Fact]
    public void FromBytes_AnySingleByteChanged_IsRefused()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var bytes = FilmTable.Build(generator, Embeddings, 4).ToBytes();

        for (var i = 0; i < bytes.Length; i++)
        {
            var tampered = bytes.ToArray();
            tampered[i] ^= 0x01;

            var error = Assert.Throws<InvalidDataException>(() => FilmTable.FromBytes(tampered));

            Assert.StartsWith("FiLM table: ", error.Message);
        }
    }

    [Fact]
    public void FromBytes_ValueChanged_ReportsTheHashMismatch()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var bytes = FilmTable.Build(generator, Embeddings, 4).ToBytes();
        BinaryPrimitives.WriteSingleLittleEndian(bytes.AsSpan(68), 1.25f);

        var error = Assert.Throws<InvalidDataException>(() => FilmTable.FromBytes(bytes, sourceName: "index.tpi [film]"));

        Assert.StartsWith("index.tpi [film]: the table fails its SHA-256 check (stored ", error.Message);
        Assert.EndsWith("it was modified or damaged. Rebuild the index.", error.Message);
    }

    [Fact]
    public void FromBytes_RecomputedHashOverImpossibleHeader_IsRefused()
    {
        // Even with a valid trailing hash the structure is checked: here the row count no longer fits the length.
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var bytes = FilmTable.Build(generator, Embeddings, 4).ToBytes();
        BinaryPrimitives.WriteUInt32LittleEndian(bytes.AsSpan(20), 3);
        SHA256.HashData(bytes.AsSpan(0, bytes.Length - 32), bytes.AsSpan(bytes.Length - 32));

        var error = Assert.Throws<InvalidDataException>(() => FilmTable.FromBytes(bytes));

        Assert.Equal("FiLM table: the table is 196 bytes but its header describes 244. Rebuild the index.", error.Message);
    }

    [Fact]
    public void FromBytes_HugeDeclaredSizesWithRecomputedHash_AreRefusedWithoutOverflow()
    {
        // Widths and a row count whose product overflows 64 bits must not wrap around to the real length.
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var bytes = FilmTable.Build(generator, Embeddings, 4).ToBytes();
        BinaryPrimitives.WriteUInt32LittleEndian(bytes.AsSpan(20), int.MaxValue);
        BinaryPrimitives.WriteUInt32LittleEndian(bytes.AsSpan(28), int.MaxValue);
        BinaryPrimitives.WriteUInt32LittleEndian(bytes.AsSpan(32), int.MaxValue);
        SHA256.HashData(bytes.AsSpan(0, bytes.Length - 32), bytes.AsSpan(bytes.Length - 32));

        var error = Assert.Throws<InvalidDataException>(() => FilmTable.FromBytes(bytes));

        Assert.StartsWith("FiLM table: the table is 196 bytes but its header describes ", error.Message);
    }

    [Fact]
    public void FromBytes_OtherGenerator_IsRefusedNamingBoth()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var other = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4-residual.safetensors"), 4);
        var bytes = FilmTable.Build(generator, Embeddings, 4).ToBytes();

        var error = Assert.Throws<InvalidDataException>(() => FilmTable.FromBytes(bytes, other.Sha256));

        Assert.Equal($"FiLM table: the table was computed with the FiLM generator {generator.Sha256}, not with the expected {other.Sha256}. Rebuild the index with the generator in use.", error.Message);
    }

    [Fact]
    public void FromBytes_NewerVersionOrForeignData_IsRefused()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var bytes = FilmTable.Build(generator, Embeddings, 4).ToBytes();
        Assert.Contains("too short", Assert.Throws<InvalidDataException>(() => FilmTable.FromBytes(bytes.AsSpan(0, 40))).Message);
        BinaryPrimitives.WriteUInt32LittleEndian(bytes.AsSpan(8), 2);

        Assert.Equal("FiLM table: the table has format version 2; this library reads version 1. Rebuild the index with this version.", Assert.Throws<InvalidDataException>(() => FilmTable.FromBytes(bytes)).Message);
        Assert.Contains("not a FiLM table", Assert.Throws<InvalidDataException>(() => FilmTable.FromBytes(Fixtures.Bytes("film-2layer-d3-e4.safetensors"))).Message);
    }

    [Fact]
    public void Build_BadEmbeddings_AreRefused()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);

        Assert.Contains("expects 4", Assert.Throws<ArgumentException>(() => FilmTable.Build(generator, new float[10], 5)).Message);
        Assert.Contains("not a positive whole number of 4-dimensional rows", Assert.Throws<ArgumentException>(() => FilmTable.Build(generator, new float[6], 4)).Message);
        Assert.Contains("not a positive whole number", Assert.Throws<ArgumentException>(() => FilmTable.Build(generator, [], 4)).Message);
        Assert.StartsWith("Phrase row 1: Embedding element 2 is NaN", Assert.Throws<ArgumentException>(() => FilmTable.Build(generator, [0, 0, 0, 0, 0, 0, float.NaN, 0], 4)).Message);
    }

    [Fact]
    public void Get_RowOutOfRange_Throws()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var table = FilmTable.Build(generator, Embeddings, 4);

        Assert.Throws<ArgumentOutOfRangeException>(() => table.Get(2));
        Assert.Throws<ArgumentOutOfRangeException>(() => table.Get(-1));
    }
}
