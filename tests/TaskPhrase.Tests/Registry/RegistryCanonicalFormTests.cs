using System.Text.Json;
using System.Text.RegularExpressions;
using TaskPhrase.Registry;

namespace TaskPhrase.Tests.Registry;

public class RegistryCanonicalFormTests
{
    private const string FishFood = """
        # one Harbor Street task, with a quote and a backslash in the title
        version: 1
        tasks:
          - id: fish-food
            title: 'Sprinkle "flakes" \ into the goldfish tank'
            controller: {manifold: shake-over.v1, latent_dims: 1}
            phrases: ["feed the fish", "Feed  the\tgoldfish"]
        """;

    /// <summary>Written by hand from the documented layout (fixed key order, defaults explicit, nulls and empty lists written).</summary>
    private const string FishFoodJson =
        """{"version":1,"model":null,"defaults":{"accept":0.6,"margin":0.04},"scoring":null,"hazard_words":[],"allow_words":[],"tasks":[{"id":"fish-food","title":"Sprinkle \"flakes\" \\ into the goldfish tank","confirm":false,"accept":null,"margin":null,"controller":{"manifold":"shake-over.v1","latent_dims":1,"decoder":null},"phrases":["feed the fish","Feed the goldfish"],"must_reject":[],"also_words":[]}]}""";

    [Fact]
    public void ToJson_SmallRegistry_MatchesHandWrittenCanonicalText()
        => Assert.Equal(FishFoodJson, RegistryCanonicalForm.ToJson(RegistryLoader.Parse(FishFood, "fish.yaml")));

    [Fact]
    public void ContentHash_SmallRegistry_IsSha256OfCanonicalText()
    {
        // Computed outside the project: printf '%s' "$FishFoodJson" | sha256sum (GNU coreutils), and checked with
        // Python's hashlib.sha256 over the same bytes.
        const string expected = "f0185f1698e9d0b2c27447ccd50059ae8095bd26f88ead2be55bb18cc90851a2";

        var registry = RegistryLoader.Parse(FishFood, "fish.yaml");

        Assert.Equal(expected, registry.ContentHash);
        Assert.Equal(expected, RegistryCanonicalForm.ComputeHash(registry));
    }

    [Fact]
    public void ToJson_Output_IsValidJsonWithTheDocumentedKeyOrder()
    {
        // System.Text.Json is the reference parser here.
        string json = RegistryCanonicalForm.ToJson(RegistryLoader.Load(RegistryFixtures.Valid("small.yaml")));

        using var doc = JsonDocument.Parse(json);
        Assert.Equal(["version", "model", "defaults", "scoring", "hazard_words", "allow_words", "tasks"],
            doc.RootElement.EnumerateObject().Select(p => p.Name));
        var task = doc.RootElement.GetProperty("tasks")[1];
        Assert.Equal(["id", "title", "confirm", "accept", "margin", "controller", "phrases", "must_reject", "also_words"],
            task.EnumerateObject().Select(p => p.Name));
        Assert.Equal(0.65, task.GetProperty("accept").GetDouble(), 6);
        Assert.Equal("decoders/pour-arc.v2.onnx", task.GetProperty("controller").GetProperty("decoder").GetString());
    }

    [Fact]
    public void ContentHash_ReformattedFixture_EqualsOriginal()
    {
        // small-reformatted.yaml holds the same content in flow style, other key order, quoting, indentation and
        // comments, a folded scalar, and leaves out the default accept (0.60) that small.yaml writes.
        var original = RegistryLoader.Load(RegistryFixtures.Valid("small.yaml"));
        var reformatted = RegistryLoader.Load(RegistryFixtures.Valid("small-reformatted.yaml"));

        Assert.Equal(original.ContentHash, reformatted.ContentHash);
        Assert.Equal(RegistryCanonicalForm.ToJson(original), RegistryCanonicalForm.ToJson(reformatted));
    }

    [Fact]
    public void ContentHash_CommentsIndentationAndLineEndings_DoNotChangeIt()
    {
        string baseline = RegistryLoader.Parse(RegistryFixtures.TwoTasks, "a.yaml").ContentHash;
        string commented = "# Noor's tasks\n" + RegistryFixtures.TwoTasks.Replace("version: 1", "version: 1   # format").Replace("\n", "\n# note\n");
        string reindented = Regex.Replace(RegistryFixtures.TwoTasks, "(?m)^  ", ""); // list items flush with "tasks:"
        string crlf = RegistryFixtures.TwoTasks.Replace("\n", "\r\n");

        Assert.Equal(baseline, RegistryLoader.Parse(commented, "b.yaml").ContentHash);
        Assert.Equal(baseline, RegistryLoader.Parse(reindented, "c.yaml").ContentHash);
        Assert.Equal(baseline, RegistryLoader.Parse(crlf, "d.yaml").ContentHash);
    }

    public static TheoryData<string, string, string> ContentEdits => new()
    {
        { "phrase word", "- water the basil", "- water the herbs" },
        { "phrase case", "- water the basil", "- Water the basil" },
        { "phrase order", "      - water the basil\n      - give the basil a drink", "      - give the basil a drink\n      - water the basil" },
        { "title", "title: Water the basil on the kitchen windowsill", "title: Water the basil" },
        { "task id", "id: water-basil", "id: basil-water" },
        { "latent dims", "latent_dims: 2", "latent_dims: 3" },
        { "manifold", "manifold: pour-arc.v2", "manifold: pour-arc.v3" },
        { "decoder", "      latent_dims: 2", "      latent_dims: 2\n      decoder: d.onnx" },
        { "confirm", "    title: Press the hall light switch", "    title: Press the hall light switch\n    confirm: true" },
        { "task accept", "    title: Press the hall light switch", "    title: Press the hall light switch\n    accept: 0.61" },
        { "task margin", "    title: Press the hall light switch", "    title: Press the hall light switch\n    margin: 0.05" },
        { "default accept", "version: 1", "version: 1\ndefaults: {accept: 0.61}" },
        { "model", "version: 1", "version: 1\nmodel: snowflake-arctic-embed-xs" },
        { "scoring", "version: 1", "version: 1\nscoring: centroid" },
        { "hazard words", "version: 1", "version: 1\nhazard_words: [scald]" },
        { "allow words", "version: 1", "version: 1\nallow_words: [cut]" },
        { "must_reject", "      - give the basil a drink", "      - give the basil a drink\n    must_reject: [throw the basil away]" },
        { "also_words", "      - give the basil a drink", "      - give the basil a drink\n    also_words: [herbs]" },
    };

    [Theory]
    [MemberData(nameof(ContentEdits))]
    public void ContentHash_AnyContentChange_ChangesIt(string what, string find, string replace)
    {
        Assert.Contains(find, RegistryFixtures.TwoTasks, StringComparison.Ordinal);
        string edited = RegistryFixtures.TwoTasks.Replace(find, replace);

        string before = RegistryLoader.Parse(RegistryFixtures.TwoTasks, "a.yaml").ContentHash;
        string after = RegistryLoader.Parse(edited, "b.yaml").ContentHash;

        Assert.True(before != after, $"changing the {what} kept the hash {before}");
    }

    [Fact]
    public void ContentHash_AllEdits_GiveDistinctHashes()
    {
        var hashes = ContentEdits.Select(row => RegistryLoader.Parse(
            RegistryFixtures.TwoTasks.Replace((string)row[1], (string)row[2]), "x.yaml").ContentHash).ToList();

        Assert.Equal(hashes.Count, hashes.Distinct().Count());
    }

    [Theory]
    [InlineData("accept: 0.6", "accept: 0.60")]
    [InlineData("accept: 0.6", "accept: 6e-1")]
    [InlineData("accept: 0", "accept: -0.0")]
    public void ContentHash_SameNumberSpelledDifferently_IsUnchanged(string a, string b)
    {
        string Make(string line) => RegistryFixtures.TwoTasks.Replace("    title: Press the hall light switch", "    title: Press the hall light switch\n    " + line);

        Assert.Equal(RegistryLoader.Parse(Make(a), "a.yaml").ContentHash, RegistryLoader.Parse(Make(b), "b.yaml").ContentHash);
    }

    [Fact]
    public void FromJson_CanonicalJson_RebuildsAnEqualRegistryWithTheSameHash()
    {
        var original = RegistryLoader.Load(RegistryFixtures.Valid("small.yaml"));

        var rebuilt = RegistryCanonicalForm.FromJson(RegistryCanonicalForm.ToJson(original), "index.tpidx");

        Assert.Equal(original.ContentHash, rebuilt.ContentHash);
        Assert.Equal(original.Tasks, rebuilt.Tasks); // TaskDefinition compares its lists item by item
        Assert.Equal(original.Defaults, rebuilt.Defaults);
        Assert.Equal(original.Settings, rebuilt.Settings);
        Assert.Equal(original.ModelId, rebuilt.ModelId);
        Assert.Equal("index.tpidx", rebuilt.SourcePath);
        Assert.Equal(RegistryCanonicalForm.ToJson(original), RegistryCanonicalForm.ToJson(rebuilt));
    }

    [Fact]
    public void FromJson_MalformedJson_ThrowsWithJsonSyntax()
    {
        var ex = Assert.Throws<RegistryException>(() => RegistryCanonicalForm.FromJson(FishFoodJson[..^3]));

        Assert.Equal(RegistryDiagnosticCodes.JsonSyntax, Assert.Single(ex.Errors).Code);
    }

    [Fact]
    public void FromJson_JsonBreakingARegistryRule_ThrowsWithTheRule()
    {
        string json = FishFoodJson.Replace("\"Feed the goldfish\"", "\"Feed the fish!\"");

        var ex = Assert.Throws<RegistryException>(() => RegistryCanonicalForm.FromJson(json));

        var error = Assert.Single(ex.Errors);
        Assert.Equal(RegistryDiagnosticCodes.DuplicatePhrase, error.Code);
        Assert.Equal(RegistryCanonicalForm.SourceName, error.Source);
        Assert.Equal(1, error.Line);
        Assert.Equal(json.IndexOf("\"Feed the fish!\"", StringComparison.Ordinal) + 1, error.Column);
    }

    [Fact]
    public void FromJson_DuplicateJsonKey_IsRefused()
    {
        string json = FishFoodJson.Replace("\"scoring\":null", "\"scoring\":null,\"scoring\":\"centroid\"");

        var ex = Assert.Throws<RegistryException>(() => RegistryCanonicalForm.FromJson(json));

        Assert.Equal(RegistryDiagnosticCodes.DuplicateKey, Assert.Single(ex.Errors).Code);
    }

    [Fact]
    public void ToJson_ControlCharacterInDecoderOfHandBuiltRegistry_IsEscaped()
    {
        var task = new TaskDefinition
        {
            Id = "fish-food",
            Title = "t",
            Controller = new ControllerBinding("m", 1, "a\u0001b"),
            Phrases = ["feed the fish"],
        };
        var registry = new TaskRegistry([task], RegistryDefaults.Standard, "x");

        string json = RegistryCanonicalForm.ToJson(registry);

        Assert.Contains("\"decoder\":\"a\\u0001b\"", json, StringComparison.Ordinal);
        Assert.Equal("a\u0001b", JsonDocument.Parse(json).RootElement.GetProperty("tasks")[0].GetProperty("controller").GetProperty("decoder").GetString());
    }
}
