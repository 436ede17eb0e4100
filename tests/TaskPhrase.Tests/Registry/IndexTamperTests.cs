using TaskPhrase.Conditioning;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Tests.Resolution;
using TaskPhrase.Tests.TestDoubles;

namespace TaskPhrase.Tests.Registry;

/// <summary>
/// Tampering with and mixing up real indexes (built by <see cref="TaskIndexBuilder.BuildAsync"/> with the bundled model
/// from a small registry, with a must_reject and a FiLM section): every single-bit flip anywhere in the file is refused
/// with an <see cref="IndexException"/>, and indexes of another model or registry are refused naming both hashes.
/// Positions are classified with the test's own reader of the documented layout (<see cref="IndexFileLayout"/>).
/// </summary>
[Collection(ModelCollection.Name)]
public sealed class IndexTamperTests(ModelFixture fixture) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-tamper-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    /// <summary>A FiLM generator for 384-wide embeddings with two small layers (deterministic demo weights).</summary>
    private static FilmGenerator Film()
    {
        const int e = 384;
        var writer = new SafeTensorsWriter();
        foreach (var (layer, width) in new[] { (0, 3), (1, 2) })
        {
            foreach (var part in new[] { "gamma", "beta" })
            {
                writer.AddFloat32($"film.{layer}.{part}.weight", Enumerable.Range(0, width * e).Select(i => MathF.Sin(i) * 0.01f).ToArray(), width, e);
                writer.AddFloat32($"film.{layer}.{part}.bias", Enumerable.Range(0, width).Select(i => 0.1f * i).ToArray(), width);
            }
        }
        return FilmGenerator.FromBytes(writer.ToArray(), "demo-film", e);
    }

    private string Build(string name = "harbor-mini.tpidx", FilmGenerator? film = null)
    {
        string path = Path.Combine(_dir, name);
        TaskIndexBuilder.BuildAsync(path, HarborMini.Registry(), fixture.Embedder, film ?? Film()).GetAwaiter().GetResult();
        return path;
    }

    private static string Classify(IndexFileLayout layout, int at)
    {
        if (at < 8) return "magic";
        if (at < 12) return "version";
        if (at < 16) return "header length";
        if (at < 16 + layout.HeaderLength) return "header";
        if (at < layout.DataStart) return "padding";
        if (at >= layout.ChecksumStart) return "checksum";
        foreach (var name in new[] { "registry", "embeddings", TaskIndexBuilder.MustRejectSection, TaskIndexBuilder.FilmSection })
        {
            var (offset, length) = layout.Region(name);
            if (at >= offset && at < offset + length) return name;
        }
        return "block padding";
    }

    [Fact]
    public void Load_EverySingleBitFlip_IsRefusedInEveryRegion()
    {
        byte[] original = File.ReadAllBytes(Build());
        var layout = new IndexFileLayout(original);
        const string path = "flipped.tpidx";
        var refusedByRegion = new SortedDictionary<string, int>(StringComparer.Ordinal);
        byte[] file = (byte[])original.Clone();
        for (int at = 0; at < original.Length; at++)
        {
            byte bit = (byte)(1 << (at % 8)); // a different bit at each position
            file[at] ^= bit;
            // The parser behind TaskIndex.Load, on the bytes (tens of thousands of files would only time the disk).
            var ex = Assert.Throws<IndexException>(() => TaskIndex.Parse(file, path));
            file[at] ^= bit;

            Assert.True(ex.Kind is IndexErrorKind.Corrupt or IndexErrorKind.NotAnIndex or IndexErrorKind.UnsupportedVersion, $"byte {at}: {ex.Kind}");
            Assert.DoesNotContain('\n', ex.Message);
            string region = Classify(layout, at);
            refusedByRegion[region] = refusedByRegion.GetValueOrDefault(region) + 1;
        }
        // Every region of the documented layout was hit (padding exists only when the header length is not a multiple of 8).
        foreach (var region in new[] { "magic", "version", "header length", "header", "registry", "embeddings", "must_reject", "film", "checksum" })
            Assert.True(refusedByRegion.GetValueOrDefault(region) > 0, $"no byte of region '{region}' was flipped");
        Assert.Equal(original.Length, refusedByRegion.Values.Sum());
        Assert.Equal(original, file);
        // And through the file path once, with the model check on.
        file[file.Length / 2] ^= 0x01;
        string onDisk = Path.Combine(_dir, "flipped.tpidx");
        File.WriteAllBytes(onDisk, file);
        Assert.Equal(IndexErrorKind.Corrupt, Assert.Throws<IndexException>(() => TaskIndex.Load(onDisk, fixture.Embedder.Model)).Kind);
    }

    [Theory]
    [InlineData("registry")]
    [InlineData("embeddings")]
    [InlineData("must_reject")]
    [InlineData("film")]
    public void Load_FlipsInABlockWithTheFileChecksumRepaired_AreCaughtByTheBlockHash(string block)
    {
        byte[] original = File.ReadAllBytes(Build());
        var layout = new IndexFileLayout(original);
        var (offset, length) = layout.Region(block);
        string path = Path.Combine(_dir, "resealed.tpidx");
        // Every 61st byte of the block, first and last included (all bytes would repeat the same check thousands of times).
        foreach (int at in Enumerable.Range(0, length).Where(i => i % 61 == 0 || i == length - 1).Select(i => offset + i))
        {
            byte[] file = (byte[])original.Clone();
            file[at] ^= 0x04;
            File.WriteAllBytes(path, IndexFileLayout.Reseal(file));

            var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path));

            Assert.Equal(IndexErrorKind.Corrupt, ex.Kind);
            Assert.Contains($"'{block}' fails its SHA-256 check", ex.Message, StringComparison.Ordinal);
        }
    }

    [Fact]
    public async Task Load_IndexBuiltWithAnotherModel_IsRefusedNamingBothHashes()
    {
        var live = fixture.Embedder.Model;
        var other = live with { Sha256 = "1111111111111111111111111111111111111111111111111111111111111111" };
        string path = Path.Combine(_dir, "other-model.tpidx");
        await TaskIndexBuilder.BuildAsync(path, HarborMini.Registry(), new RelabelledEmbeddingGenerator(fixture.Embedder, other));

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path, live));

        Assert.Equal(IndexErrorKind.ModelMismatch, ex.Kind);
        Assert.Contains(other.Sha256, ex.Message, StringComparison.Ordinal);
        Assert.Contains(live.Sha256, ex.Message, StringComparison.Ordinal);
        // Loaded without the check, the resolver still refuses to pair it with the live model.
        var unchecked_ = TaskIndex.Load(path);
        var mismatch = Assert.Throws<InvalidOperationException>(() => TaskResolver.FromIndex(unchecked_, fixture.Embedder));
        Assert.Contains(other.Sha256, mismatch.Message, StringComparison.Ordinal);
        Assert.Contains(live.Sha256, mismatch.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Load_IndexOfAnotherRegistry_IsRefusedNamingBothHashes()
    {
        string path = Build();
        var edited = RegistryLoader.Parse(HarborMini.Yaml.Replace("- feed the fish", "- feed the goldfish", StringComparison.Ordinal), "edited.yaml");
        string built = HarborMini.Registry().ContentHash;
        Assert.NotEqual(built, edited.ContentHash);

        var ex = Assert.Throws<IndexException>(() => TaskIndex.Load(path, fixture.Embedder.Model, edited.ContentHash));

        Assert.Equal(IndexErrorKind.RegistryMismatch, ex.Kind);
        Assert.Contains(built, ex.Message, StringComparison.Ordinal);
        Assert.Contains(edited.ContentHash, ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void FromIndex_FilmSectionOfAnotherRegistry_IsInvalidData()
    {
        // A well-formed FiLM table (its own hashes intact) with the wrong number of rows, stored under the film
        // section of an otherwise valid index: a malformed section, refused as FromIndex documents.
        var film = TaskIndex.Load(Build(film: Film())).Sections[TaskIndexBuilder.FilmSection].ToArray();
        var fewer = RegistryLoader.Parse(HarborMini.Yaml.Replace("      - give the basil a drink\n", "", StringComparison.Ordinal), "fewer.yaml");
        var good = TaskIndex.Load(Build("fewer.tpidx"));
        int rows = fewer.Tasks.Sum(t => t.Phrases.Count);
        string path = Path.Combine(_dir, "foreign-film.tpidx");
        var embeddings = new float[rows * good.Dimensions];
        for (int r = 0; r < rows; r++) embeddings[r * good.Dimensions] = 1f;
        TaskIndex.Write(path, fewer, good.Model, embeddings, new Dictionary<string, byte[]>
        {
            [TaskIndexBuilder.MustRejectSection] = good.Sections[TaskIndexBuilder.MustRejectSection].ToArray(),
            [TaskIndexBuilder.FilmSection] = film,
        });
        var index = TaskIndex.Load(path, fixture.Embedder.Model);

        var ex = Assert.Throws<InvalidDataException>(() => TaskResolver.FromIndex(index, fixture.Embedder));

        Assert.Contains(path, ex.Message, StringComparison.Ordinal);
        Assert.Contains("film", ex.Message, StringComparison.Ordinal);
    }
}
