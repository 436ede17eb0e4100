using TaskPhrase.Conditioning;
using TaskPhrase.Embedding;
using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Fuzz;

/// <summary>
/// The fuzz targets. Each one writes the input to a scratch file (so the file-reading path, with its size and
/// encoding checks, is what is fuzzed), calls the public loader and lets through only the exception types the
/// loader documents for bad input. Inputs that load are pushed further through documented round trips and
/// consumers; a broken round trip throws <see cref="InvariantViolation"/>, which counts as a crash.
/// </summary>
internal static class FuzzTargets
{
    private static readonly string Scratch = Path.Combine(Path.GetTempPath(), $"taskphrase-fuzz-{Environment.ProcessId}");

    public static IReadOnlyList<FuzzTarget> All { get; } =
    [
        new("registry", "registry YAML file → RegistryLoader.Load (RegistryException); loaded ones: canonical JSON round trip keeps the hash, HazardLint",
            ["tests/data/registries/valid", "tests/data/registries/broken", "examples/harbor-street"], Registry),
        new("probes", "probe suite CSV file → ProbeSuite.Load (ProbeSuiteException); loaded ones: Write then Parse gives the same probes",
            ["tests/data/probes", "examples/harbor-street"], Probes),
        new("safetensors", "safetensors file → SafeTensorsFile.FromBytes and every tensor read (SafeTensorsException); FilmGenerator.FromBytes (SafeTensorsException)",
            ["tests/data/safetensors"], SafeTensors),
        new("index", "index file with its checksums repaired → TaskIndex.Load (IndexException); loaded ones: TaskResolver.FromIndex (InvalidDataException) and one resolve",
            ["tests/TaskPhrase.Fuzz/seeds/index"], Index),
        new("index-raw", "index file as mutated (checksums not repaired) → TaskIndex.Load (IndexException)",
            ["tests/TaskPhrase.Fuzz/seeds/index"], IndexRaw),
    ];

    public static FuzzTarget Find(string name)
        => All.FirstOrDefault(t => t.Name == name)
           ?? throw new ArgumentException($"unknown target '{name}'; targets: {string.Join(", ", All.Select(t => t.Name))}.");

    private static string WriteScratch(byte[] data, string extension)
    {
        string path = Scratch + extension;
        File.WriteAllBytes(path, data);
        return path;
    }

    private static void Registry(byte[] data)
    {
        TaskRegistry registry;
        try
        {
            registry = RegistryLoader.Load(WriteScratch(data, ".yaml"));
        }
        catch (RegistryException)
        {
            return;
        }
        string json = RegistryCanonicalForm.ToJson(registry);
        var back = RegistryCanonicalForm.FromJson(json);
        if (back.ContentHash != registry.ContentHash)
            throw new InvariantViolation($"canonical JSON round trip changed the hash: {registry.ContentHash} → {back.ContentHash}");
        if (RegistryCanonicalForm.ComputeHash(back) != back.ContentHash)
            throw new InvariantViolation("a registry rebuilt from canonical JSON does not hash to its own ContentHash");
        _ = HazardLint.Check(registry);
    }

    private static void Probes(byte[] data)
    {
        ProbeSuite suite;
        try
        {
            suite = ProbeSuite.Load(WriteScratch(data, ".csv"));
        }
        catch (ProbeSuiteException)
        {
            return;
        }
        var text = new StringWriter();
        ProbeSuite.Write(text, suite.Cases);
        var back = ProbeSuite.Parse(new StringReader(text.ToString()), "round-trip.csv");
        if (back.Cases.Count != suite.Cases.Count)
            throw new InvariantViolation($"Write then Parse gave {back.Cases.Count} probes instead of {suite.Cases.Count}");
        for (int i = 0; i < suite.Cases.Count; i++)
        {
            var (a, b) = (suite.Cases[i], back.Cases[i]);
            if (a.Utterance != b.Utterance || a.Expect != b.Expect || a.Kind != b.Kind || a.Note != b.Note)
                throw new InvariantViolation($"probe {i} changed in the round trip: {a} → {b}");
        }
    }

    private static void SafeTensors(byte[] data)
    {
        try
        {
            using var file = SafeTensorsFile.FromBytes(data, "fuzz.safetensors");
            foreach (var tensor in file.Tensors)
            {
                _ = file.ReadBytes(tensor.Name);
                if (tensor.DType is SafeTensorsDType.F32 or SafeTensorsDType.F16 or SafeTensorsDType.BF16) _ = file.ReadFloats(tensor.Name);
            }
        }
        catch (SafeTensorsException)
        {
        }
        FilmGenerator generator;
        try
        {
            generator = FilmGenerator.FromBytes(data, "fuzz.safetensors", 4);
        }
        catch (SafeTensorsException)
        {
            return;
        }
        try
        {
            _ = generator.Compute([0.5f, 0.5f, 0.5f, 0.5f]);
        }
        catch (ArgumentException)
        {
            // Documented: "a result that overflows" for extreme but finite weights.
        }
    }

    private static void Index(byte[] data) => LoadIndex(IndexResealer.Reseal(data), resolve: true);

    private static void IndexRaw(byte[] data) => LoadIndex(data, resolve: false);

    private static void LoadIndex(byte[] data, bool resolve)
    {
        TaskIndex index;
        try
        {
            index = TaskIndex.Load(WriteScratch(data, ".tpidx"));
        }
        catch (IndexException)
        {
            return;
        }
        if (!resolve) return;
        TaskResolver resolver;
        try
        {
            resolver = TaskResolver.FromIndex(index, new FixedEmbeddingGenerator(index.Model));
        }
        catch (InvalidDataException)
        {
            return;
        }
        var phrase = index.Phrases.Count > 0 ? index.Phrases[0] : "water the basil";
        var exact = resolver.Resolve(phrase);
        // A phrase longer than the input cap is cut before matching, so only shorter ones must match exactly.
        bool fits = Text.TextNormalizer.Normalize(phrase).Length <= new ResolverOptions().MaxInputChars;
        if (fits && (exact.Outcome != ResolutionOutcome.Accepted || !exact.ExactMatch))
            throw new InvariantViolation($"the index's own phrase \"{phrase}\" was not accepted as an exact match ({exact.Outcome}, {exact.Reason})");
        _ = resolver.Resolve("could you water the plant please");
    }

    /// <summary>Writes the index seeds (4-dimensional stand-in embeddings, with and without a FiLM table).</summary>
    public static void WriteIndexSeeds(string repoRoot, string directory)
    {
        Directory.CreateDirectory(directory);
        var model = new EmbeddingModelInfo("fuzz-model", new string('a', 64), 4, 16, "mean");
        var generator = new FixedEmbeddingGenerator(model);
        var film = FilmGenerator.Load(Path.Combine(repoRoot, "tests/data/safetensors/film-2layer-d3-e4.safetensors"), 4);
        var small = RegistryLoader.Load(Path.Combine(repoRoot, "tests/data/registries/valid/small.yaml"));
        var tiny = RegistryLoader.Parse(
            "version: 1\ntasks:\n  - id: fish-food\n    title: Feed the fish\n    controller:\n      manifold: pinch-shake.v1\n      latent_dims: 1\n    phrases:\n      - feed the fish\n    must_reject:\n      - eat the fish\n",
            "tiny.yaml");
        TaskIndexBuilder.BuildAsync(Path.Combine(directory, "small.tpidx"), small, generator).GetAwaiter().GetResult();
        TaskIndexBuilder.BuildAsync(Path.Combine(directory, "small-film.tpidx"), small, generator, film).GetAwaiter().GetResult();
        TaskIndexBuilder.BuildAsync(Path.Combine(directory, "tiny.tpidx"), tiny, generator).GetAwaiter().GetResult();
        TaskIndexBuilder.BuildAsync(Path.Combine(directory, "tiny-film.tpidx"), tiny, generator, film).GetAwaiter().GetResult();
    }
}
