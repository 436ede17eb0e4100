using System.Text;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;

namespace TaskPhrase.Tests.Registry;

public sealed class TaskIndexTests : IDisposable
{
    // The bundled model's identity as published in the design (product.md, "Default model"); 4 dimensions here
    // to keep the test vectors small.
    private static readonly EmbeddingModelInfo MiniLm =
        new("all-minilm-l6-v2", "4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2", 4, 256, "mean");

    private static readonly EmbeddingModelInfo ArcticXs =
        new("snowflake-arctic-embed-xs", "cf2698d30ff05da02c70a088313bad56e5c2f401d734cb24a8390d446111936c", 4, 512, "cls");

    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-index-").FullName;
    private readonly TaskRegistry _registry = RegistryLoader.Load(RegistryFixtures.Valid("small.yaml"));

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    private int PhraseCount => _registry.Tasks.Sum(t => t.Phrases.Count);

    private float[] Embeddings()
    {
        var values = new float[PhraseCount * MiniLm.Dimensions];
        for (int i = 0; i < values.Length; i++) values[i] = MathF.Sin(i + 1) / (1 + i % 3);
        return values;
    }

    private static Dictionary<string, byte[]> Sections() => new()
    {
        ["whitening"] = Encoding.UTF8.GetBytes("a whitening matrix would be here"),
        ["film.v1"] = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11],
    };

    private string WriteIndex(string name = "small.tpidx")
    {
        string path = Path.Combine(_dir, name);
        TaskIndex.Write(path, _registry, MiniLm, Embeddings(), Sections());
        return path;
    }

    private string Save(byte[] bytes, string name = "edited.tpidx")
    {
        string path = Path.Combine(_dir, name);
        File.WriteAllBytes(path, bytes);
        return path;
    }

    [Fact]
    public void WriteThenLoad_RoundTrip_RestoresEverything()
    {
        string path = WriteIndex();

        var index = TaskIndex.Load(path, MiniLm);

        Assert.Equal(_registry.ContentHash, index.RegistryHash);
        Assert.Equal(_registry.Tasks, index.Registry.Tasks);
        Assert.Equal(_registry.Defaults, index.Registry.Defaults);
        Assert.Equal(_registry.Settings, index.Registry.Settings);
        Assert.Equal(MiniLm, index.Model);
        Assert.Equal(4, index.Dimensions);
        Assert.Equal(18, index.PhraseCount); // small.yaml: three tasks of six phrases
        Assert.Equal(Embeddings(), index.PhraseEmbeddings.ToArray());
        Assert.Equal(Enumerable.Repeat(0, 6).Concat(Enumerable.Repeat(1, 6)).Concat(Enumerable.Repeat(2, 6)), index.PhraseTaskIndex.ToArray());
        Assert.Equal(_registry.Tasks.SelectMany(t => t.Phrases), index.Phrases);
        Assert.Equal("water-basil", index.GetTask(6).Id);
        Assert.Equal(Embeddings().AsSpan(7 * 4, 4).ToArray(), index.GetEmbedding(7).ToArray());
        Assert.Equal(["film.v1", "whitening"], index.Sections.Keys);
        foreach (var (name, data) in Sections()) Assert.Equal(data, index.Sections[name].ToArray());
        Assert.Equal(path, index.SourcePath);
    }

    [Fact]
    public void Write_SameInputs_GiveByteIdenticalFiles()
    {
        string a = WriteIndex("a.tpidx");
        // Same content, sections added in the other order and a second registry load: still the same bytes.
        var reversed = Sections().Reverse().ToDictionary();
        string b = Path.Combine(_dir, "b.tpidx");
        TaskIndex.Write(b, RegistryLoader.Load(RegistryFixtures.Valid("small-reformatted.yaml")), MiniLm, Embeddings(), reversed);

        Assert.Equal(File.ReadAllBytes(a), File.ReadAllBytes(b));
    }

    [Fact]
    public void Write_ReplacesAnExistingFileAndLeavesNoTemporaryFiles()
    {
        string path = Path.Combine(_dir, "small.tpidx");
        File.WriteAllText(path, "an older file");

        TaskIndex.Write(path, _registry, MiniLm, Embeddings());

        Assert.Equal([path], Directory.GetFiles(_dir));
        Assert.Equal(_registry.ContentHash, TaskIndex.Load(path).RegistryHash);
    }

    [Fact]
    public void Write_InvalidInput_LeavesTheExistingFileUntouched()
    {
        string path = WriteIndex();
        byte[] before = File.ReadAllBytes(path);

        Assert.Throws<ArgumentException>(() => TaskIndex.Write(path, _registry, MiniLm, new float[5]));

        Assert.Equal(before, File.ReadAllBytes(path));
        Assert.Equal([path], Directory.GetFiles(_dir));
    }

    [Fact]
    public void Write_WrongEmbeddingCount_ThrowsNamingTheShape()
    {
        var ex = Assert.Throws<ArgumentException>(() => TaskIndex.Write(Path.Combine(_dir, "x"), _registry, MiniLm, new float[10]));

        Assert.Contains("18 phrases × 4 dimensions = 72 floats, but got 10", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Write_NonFiniteEmbedding_Throws()
    {
        var values = Embeddings();
        values[9] = float.NaN;

        var ex = Assert.Throws<ArgumentException>(() => TaskIndex.Write(Path.Combine(_dir, "x"), _registry, MiniLm, values));

        Assert.Contains("row 2", ex.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("")]
    [InlineData("Film")]
    [InlineData("../escape")]
    [InlineData("-leading-hyphen")]
    public void Write_BadSectionName_Throws(string name)
        => Assert.Throws<ArgumentException>(() => TaskIndex.Write(Path.Combine(_dir, "x"), _registry, MiniLm, Embeddings(),
            new Dictionary<string, byte[]> { [name] = [1] }));

    [Fact]
    public void Write_RegistryWithForeignHash_Throws()
    {
        var forged = new TaskRegistry(_registry.Tasks, _registry.Defaults, new string('a', 64), _registry.ModelId, null, _registry.Settings);

        var ex = Assert.Throws<ArgumentException>(() => TaskIndex.Write(Path.Combine(_dir, "x"), forged, MiniLm, Embeddings()));

        Assert.Contains("does not match its content", ex.Message, StringComparison.Ordinal);
    }

    public static TheoryData<string> Regions => ["magic", "version", "header length", "header", "registry", "embeddings", "section", "checksum"];

    [Theory]
    [MemberData(nameof(Regions))]
    public void Load_FlippedByteInAnyRegion_IsRefused(string region)
    {
        byte[] file = File.ReadAllBytes(WriteIndex());
        var layout = new IndexFileLayout(file);
        int at = region switch
        {
            "magic" => 3,
            "version" => 8,
            "header length" => 12,
            "header" => 16 + layout.HeaderLength / 2,
            "registry" => layout.Region("registry").Offset + 40,
            "embeddings" => layout.Region("embeddings").Offset + 5,
            "section" => layout.Region("whitening").Offset + 2,
            "checksum" => layout.ChecksumStart + 31,
            _ => throw new ArgumentOutOfRangeException(nameof(region)),
        };
        file[at] ^= 0x10;
        string path = Save(file);

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.NotEqual(IndexErrorKind.ModelMismatch, ex.Kind);
        Assert.Contains(path, ex.Message, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', ex.Message);
        Assert.Equal(path, ex.Path);
    }

    [Theory]
    [InlineData("registry")]
    [InlineData("embeddings")]
    [InlineData("whitening")]
    public void Load_FlippedByteWithResealedChecksum_IsCaughtByTheBlockHash(string block)
    {
        byte[] file = File.ReadAllBytes(WriteIndex());
        var layout = new IndexFileLayout(file);
        file[layout.Region(block).Offset + 1] ^= 0x01;
        string path = Save(IndexFileLayout.Reseal(file));

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.Equal(IndexErrorKind.Corrupt, ex.Kind);
        Assert.Contains($"'{block}' fails its SHA-256 check", ex.Message, StringComparison.Ordinal);
        Assert.Contains("taskphrase build", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_StaleRegistryHashInHeader_IsRefusedNamingBothHashes()
    {
        var layout = new IndexFileLayout(File.ReadAllBytes(WriteIndex()));
        string forged = new('b', 64);
        string path = Save(layout.WithHeader(h => h["registry_hash"] = forged));

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.Equal(IndexErrorKind.Corrupt, ex.Kind);
        Assert.Contains(forged, ex.Message, StringComparison.Ordinal);
        Assert.Contains(_registry.ContentHash, ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_RegistryEditedWithConsistentBlockHash_IsRefusedByTheRegistryHash()
    {
        // Someone edits a phrase in the stored JSON and fixes the block's SHA-256 and the trailer, but not the
        // registry hash: the recomputed hash of the stored JSON gives it away.
        var layout = new IndexFileLayout(File.ReadAllBytes(WriteIndex()));
        var (offset, length) = layout.Region("registry");
        string json = Encoding.UTF8.GetString(layout.File, offset, length);
        string edited = json.Replace("turn on the hall light", "turn on the hall lamps", StringComparison.Ordinal); // same length
        Assert.NotEqual(json, edited);
        string path = Save(layout.WithBlockBytes("registry", Encoding.UTF8.GetBytes(edited)));

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.Equal(IndexErrorKind.Corrupt, ex.Kind);
        Assert.Contains("does not match the hash of the stored registry", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_BlockOffsetBeyondTheData_IsRefused()
    {
        var layout = new IndexFileLayout(File.ReadAllBytes(WriteIndex()));
        string path = Save(layout.WithHeader(h => h["sections"]![0]!["offset"] = 1L << 40));

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.Equal(IndexErrorKind.Corrupt, ex.Kind);
        Assert.Contains("lies outside", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_HeaderCountsDisagreeWithTheRegistry_IsRefused()
    {
        var layout = new IndexFileLayout(File.ReadAllBytes(WriteIndex()));
        string path = Save(layout.WithHeader(h => h["phrase_count"] = 17));

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.Contains("17 phrases", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_MalformedHeader_IsRefused()
    {
        var layout = new IndexFileLayout(File.ReadAllBytes(WriteIndex()));
        string path = Save(layout.WithHeader(h => h.Remove("model")));

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.Equal(IndexErrorKind.Corrupt, ex.Kind);
        Assert.Contains("header is malformed", ex.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData(0)]
    [InlineData(7)]
    [InlineData(20)]
    [InlineData(47)]
    [InlineData(-1)] // half the file
    [InlineData(-2)] // all but the last byte
    public void Load_TruncatedFile_IsRefused(int keep)
    {
        byte[] file = File.ReadAllBytes(WriteIndex());
        int length = keep switch { -1 => file.Length / 2, -2 => file.Length - 1, _ => keep };
        string path = Save(file[..length]);

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.True(ex.Kind is IndexErrorKind.Corrupt or IndexErrorKind.NotAnIndex, ex.Kind.ToString());
        Assert.Contains(path, ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_OtherModel_IsRefusedNamingBothHashes()
    {
        string path = WriteIndex();

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path, ArcticXs));

        Assert.Equal(IndexErrorKind.ModelMismatch, ex.Kind);
        Assert.Contains(MiniLm.Sha256, ex.Message, StringComparison.Ordinal);
        Assert.Contains(ArcticXs.Sha256, ex.Message, StringComparison.Ordinal);
        Assert.Contains("all-minilm-l6-v2", ex.Message, StringComparison.Ordinal);
        Assert.Contains("snowflake-arctic-embed-xs", ex.Message, StringComparison.Ordinal);
        Assert.DoesNotContain('\n', ex.Message);
    }

    [Fact]
    public void Load_SameModelIdButOtherFile_IsRefused()
    {
        string path = WriteIndex();
        var retrained = MiniLm with { Sha256 = new string('c', 64) };

        Assert.Equal(IndexErrorKind.ModelMismatch, Assert.Throws<IndexException>(() => TaskIndex.Load(path, retrained)).Kind);
    }

    [Fact]
    public void Load_ExpectedModelWithUpperCaseHash_IsAccepted()
    {
        string path = WriteIndex();

        var index = TaskIndex.Load(path, MiniLm with { Sha256 = MiniLm.Sha256.ToUpperInvariant() });

        Assert.Equal(MiniLm.Sha256, index.Model.Sha256);
    }

    [Fact]
    public void Load_OtherRegistryExpected_IsRefusedNamingBothHashes()
    {
        string path = WriteIndex();
        var other = RegistryLoader.Parse(RegistryFixtures.TwoTasks, "two.yaml");

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path, MiniLm, other.ContentHash));

        Assert.Equal(IndexErrorKind.RegistryMismatch, ex.Kind);
        Assert.Contains(other.ContentHash, ex.Message, StringComparison.Ordinal);
        Assert.Contains(_registry.ContentHash, ex.Message, StringComparison.Ordinal);
        Assert.Equal(_registry.ContentHash, TaskIndex.Load(path, MiniLm, _registry.ContentHash).RegistryHash);
    }

    [Fact]
    public void Load_RegistryYaml_IsRefusedAsNotAnIndexWithAHint()
    {
        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(RegistryFixtures.Valid("small.yaml")));

        Assert.Equal(IndexErrorKind.NotAnIndex, ex.Kind);
        Assert.Contains("taskphrase build", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_UnknownFormatVersion_IsRefused()
    {
        byte[] file = File.ReadAllBytes(WriteIndex());
        file[8] = 2;
        string path = Save(IndexFileLayout.Reseal(file));

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

        Assert.Equal(IndexErrorKind.UnsupportedVersion, ex.Kind);
        Assert.Contains("format version 2", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_MissingFile_IsRefusedAsNotFound()
    {
        string path = Path.Combine(_dir, "none.tpidx");

        Assert.Equal(IndexErrorKind.NotFound, Assert.Throws<IndexException>(() => TaskIndex.Load(path)).Kind);
    }

    [Fact]
    public void Layout_WrittenFile_FollowsTheDocumentedFormat()
    {
        // Read back with the test's own parser: magic, version 1, 8-aligned data, trailing SHA-256 of the rest.
        byte[] file = File.ReadAllBytes(WriteIndex());
        var layout = new IndexFileLayout(file);

        Assert.Equal(new byte[] { 0x89, 0x54, 0x50, 0x58, 0x0D, 0x0A, 0x1A, 0x0A }, file[..8]);
        Assert.Equal(1, BitConverter.ToInt32(file, 8));
        Assert.Equal(0, layout.DataStart % 8);
        Assert.Equal(_registry.ContentHash, (string)layout.Header["registry_hash"]!);
        Assert.Equal(RegistryCanonicalForm.ToJson(_registry), Encoding.UTF8.GetString(file, layout.Region("registry").Offset, layout.Region("registry").Length));
        Assert.Equal(18 * 4 * sizeof(float), layout.Region("embeddings").Length);
        Assert.Equal(BitConverter.GetBytes(Embeddings()[0]), file.AsSpan(layout.Region("embeddings").Offset, 4).ToArray());
        Assert.Equal(System.Security.Cryptography.SHA256.HashData(file.AsSpan(0, file.Length - 32)), file[^32..]);
    }
}
