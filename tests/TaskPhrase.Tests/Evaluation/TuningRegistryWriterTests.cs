using System.Globalization;
using TaskPhrase.Evaluation;
using YamlDotNet.RepresentationModel;
using static TaskPhrase.Tests.Evaluation.TuningTestData;

namespace TaskPhrase.Tests.Evaluation;

// The written files are checked with YamlDotNet's own parser (a reference outside this project's code).
public class TuningRegistryWriterTests
{
    private const string Harbor = """
        # Harbor Street flat: tasks agreed with Noor's occupational therapist.
        version: 1
        model: all-minilm-l6-v2
        defaults:
          accept: 0.60   # first guess, to be tuned
          margin: 0.04
        tasks:
          # Hall first: used every evening.
          - id: hall-light
            title: Press the hall light switch
            controller:
              manifold: reach-press.v1
              latent_dims: 1
            phrases:
              - press the hall light switch
              - turn on the hall light   # Noor's usual wording
          - id: kettle-pour
            title: Pour hot water from the kettle into the teapot
            confirm: true
            accept: 0.70
            controller: { manifold: pour-arc.v2, latent_dims: 2 }
            phrases:
              - pour hot water into the teapot
              - 'make the tea water'
            must_reject:
              - pour the hot water on my lap
          - id: blanket
            title: Pull the blanket over her knees
            confirm: true
            margin: 0.06
            controller:
              manifold: drape-pull.v1
              latent_dims: 2
            phrases:
              - pull the blanket over my knees

        """;

    private static TuningResult Result(float accept, float margin, Dictionary<string, float>? overrides = null)
    {
        var rule = new DecisionRule(accept, margin, overrides);
        ScoredProbe[] probes = [InScope("hall-light", "hall-light", 0.9f), OutOfScope("blanket", 0.3f)];
        return new TuningResult
        {
            Mode = TuningMode.Budget,
            Rule = rule,
            Metrics = TuningMetrics.Evaluate(probes, rule),
            Feasible = true,
            Budgets = new TuningBudgets(0.02, 0.01),
            ProbeCount = probes.Length,
        };
    }

    private static string Write(string yaml, TuningResult result, string provenance = "tuned in a test")
    {
        var sw = new StringWriter(CultureInfo.InvariantCulture);
        TunedRegistryWriter.Write(yaml, result, provenance, sw, "harbor-street.yaml");
        return sw.ToString();
    }

    private static YamlMappingNode Load(string yaml)
    {
        var stream = new YamlStream();
        stream.Load(new StringReader(yaml));
        return (YamlMappingNode)stream.Documents[0].RootNode;
    }

    private static string? Scalar(YamlMappingNode map, params string[] path)
    {
        YamlNode node = map;
        foreach (string key in path)
        {
            if (node is not YamlMappingNode m || !m.Children.TryGetValue(new YamlScalarNode(key), out var next)) return null;
            node = next;
        }
        return (node as YamlScalarNode)?.Value;
    }

    private static YamlMappingNode Task(YamlMappingNode root, string id)
        => ((YamlSequenceNode)root.Children[new YamlScalarNode("tasks")]).Children.Cast<YamlMappingNode>().Single(t => Scalar(t, "id") == id);

    /// <summary>The parsed tree as text, without the threshold keys the writer may change.</summary>
    private static string StructureWithoutThresholds(YamlNode node) => node switch
    {
        YamlScalarNode s => "'" + s.Value + "'",
        YamlSequenceNode q => "[" + string.Join(",", q.Children.Select(StructureWithoutThresholds)) + "]",
        YamlMappingNode m => "{" + string.Join(",", m.Children
            .Where(e => ((YamlScalarNode)e.Key).Value is not ("accept" or "margin"))
            .Select(e => StructureWithoutThresholds(e.Key) + ":" + StructureWithoutThresholds(e.Value))) + "}",
        _ => "?",
    };

    [Fact]
    public void Write_HarborRegistry_SetsDefaultsAndOverride()
    {
        var output = Load(Write(Harbor, Result(0.68f, 0.03f, new() { ["kettle-pour"] = 0.72f, ["hall-light"] = 0.55f })));
        Assert.Equal("0.68", Scalar(output, "defaults", "accept"));
        Assert.Equal("0.03", Scalar(output, "defaults", "margin"));
        Assert.Equal("0.72", Scalar(Task(output, "kettle-pour"), "accept"));
        Assert.Equal("0.55", Scalar(Task(output, "hall-light"), "accept"));
    }

    [Fact]
    public void Write_HarborRegistry_KeepsEverythingElse()
    {
        string text = Write(Harbor, Result(0.68f, 0.03f, new() { ["hall-light"] = 0.55f }));
        Assert.Equal(StructureWithoutThresholds(Load(Harbor)), StructureWithoutThresholds(Load(text)));
        // Every comment and every line of the source is still there, in order (edited lines keep their comments).
        var outputLines = text.Split('\n');
        int at = 0;
        foreach (string line in Harbor.Split('\n').Where(l => l.Trim().Length > 0))
        {
            string expectedStart = line.Contains("accept: 0.60") ? "  accept: 0.68   # first guess"
                : line.Contains("margin: 0.04") ? "  margin: 0.03"
                : line.Contains("accept: 0.70") ? "    # accept: 0.70"
                : line.Contains("margin: 0.06") ? "    # margin: 0.06"
                : line;
            while (at < outputLines.Length && !outputLines[at].StartsWith(expectedStart, StringComparison.Ordinal)) at++;
            Assert.True(at < outputLines.Length, $"line not found in order: {line}");
        }
    }

    [Fact]
    public void Write_PerTaskValuesWithoutOverride_AreCommentedOutWithReason()
    {
        string text = Write(Harbor, Result(0.68f, 0.03f));
        var output = Load(text);
        Assert.Null(Scalar(Task(output, "kettle-pour"), "accept"));
        Assert.Null(Scalar(Task(output, "blanket"), "margin"));
        Assert.Contains("    # accept: 0.70  # removed by 'taskphrase tune': the tuned registry-wide value applies", text);
        Assert.Contains("    # margin: 0.06  # removed by 'taskphrase tune'", text);
    }

    [Fact]
    public void Write_Override_IsInsertedBeforeController()
    {
        string text = Write(Harbor, Result(0.68f, 0.03f, new() { ["blanket"] = 0.66f }));
        int accept = text.IndexOf("    accept: 0.66\n", StringComparison.Ordinal);
        int title = text.IndexOf("title: Pull the blanket", StringComparison.Ordinal);
        int controller = text.IndexOf("manifold: drape-pull.v1", StringComparison.Ordinal);
        Assert.True(title < accept && accept < controller, text);
    }

    [Fact]
    public void Write_Header_RecordsProvenanceAndWarning()
    {
        var result = Result(0.68f, 0.03f);
        string provenance = TunedRegistryWriter.BuildProvenanceComment(result, "probes/harbor-tune.csv", new string('a', 64),
            new DateTimeOffset(2025, 3, 14, 9, 30, 0, TimeSpan.FromHours(1)));
        string text = Write(Harbor, result, provenance);
        var lines = text.Split('\n');
        Assert.Equal(TunedRegistryWriter.HeaderStart, lines[0]);
        Assert.Contains("# Thresholds chosen by 'taskphrase tune' on 2025-03-14 08:30 UTC.", lines);
        Assert.Contains(lines, l => l.StartsWith("# Tuning suite: probes/harbor-tune.csv (SHA-256 " + new string('a', 64), StringComparison.Ordinal));
        Assert.Contains(lines, l => l.Contains("false-accept rate <= 0.02, wrong-task rate <= 0.01", StringComparison.Ordinal));
        Assert.Contains(lines, l => l.Contains("in-scope accuracy 1.0000 (1/1", StringComparison.Ordinal));
        Assert.Contains("# " + TunedRegistryWriter.Warning, lines);
        Assert.Contains(TunedRegistryWriter.HeaderEnd, lines);
        Assert.Equal("# Harbor Street flat: tasks agreed with Noor's occupational therapist.", lines[Array.IndexOf(lines, TunedRegistryWriter.HeaderEnd) + 1]);
    }

    [Fact]
    public void Write_TunedFileAgain_ReplacesEarlierHeader()
    {
        string once = Write(Harbor, Result(0.68f, 0.03f), "first run");
        string twice = Write(once, Result(0.66f, 0.02f), "second run");
        Assert.Equal(1, twice.Split('\n').Count(l => l == TunedRegistryWriter.HeaderStart));
        Assert.DoesNotContain("first run", twice);
        Assert.Equal("0.66", Scalar(Load(twice), "defaults", "accept"));
    }

    [Fact]
    public void Write_NoDefaults_AddsBlockAfterModel()
    {
        string yaml = "version: 1\nmodel: all-minilm-l6-v2\n# the tasks\ntasks:\n  - id: hall-light\n    title: Light\n    phrases: [press the light]\n";
        string text = Write(yaml, Result(0.62f, 0.05f));
        Assert.Contains("model: all-minilm-l6-v2\ndefaults:\n  accept: 0.62\n  margin: 0.05\n# the tasks\ntasks:", text);
    }

    [Fact]
    public void Write_NoDefaultsNoVersion_AddsBlockBeforeTasksComments()
    {
        string yaml = "# the tasks\ntasks:\n  - id: hall-light\n    title: Light\n    phrases: [press the light]\n";
        string text = Write(yaml, Result(0.62f, 0.05f, new() { ["hall-light"] = 0.7f }));
        Assert.Contains("defaults:\n  accept: 0.62\n  margin: 0.05\n# the tasks\ntasks:", text);
        Assert.Contains("    title: Light\n    accept: 0.7\n    phrases: [press the light]\n", text);
    }

    [Fact]
    public void Write_MissingKeyAtEndWithoutFinalNewline_IsAppendedOnItsOwnLine()
    {
        // A task that starts with a list: the override goes after its last entry, a block list ending in a comment.
        string yaml = "tasks:\n  - phrases:\n      - press the light\n    id: hall-light\n    must_reject:\n      - smash the light\n    # more later\n\n" +
            "defaults:\n  accept: 0.5";
        string text = Write(yaml, Result(0.62f, 0.05f, new() { ["hall-light"] = 0.7f }));
        Assert.EndsWith("defaults:\n  accept: 0.62\n  margin: 0.05\n", text);
        Assert.Contains("      - smash the light\n    accept: 0.7\n    # more later\n\ndefaults:", text);
    }

    [Fact]
    public void Write_EmptyOrFlowDefaults_AreFilledIn()
    {
        string empty = Write("version: 1\ndefaults:\ntasks:\n  - id: blanket\n    phrases: [pull the blanket up]\n", Result(0.6f, 0.04f));
        Assert.Equal("0.6", Scalar(Load(empty), "defaults", "accept"));
        string flow = Write("version: 1\ndefaults: { accept: 0.5, extra: 1 }\ntasks:\n  - id: blanket\n    phrases: [pull the blanket up]\n", Result(0.61f, 0.04f));
        Assert.Contains("defaults: { accept: 0.61, extra: 1, margin: 0.04 }", flow);
    }

    [Fact]
    public void Write_CrLfSource_KeepsCrLf()
    {
        string text = Write(Harbor.Replace("\n", "\r\n", StringComparison.Ordinal), Result(0.68f, 0.03f, new() { ["blanket"] = 0.66f }));
        Assert.DoesNotContain('\n', text.Replace("\r\n", "", StringComparison.Ordinal));
        Assert.Equal("0.66", Scalar(Task(Load(text), "blanket"), "accept"));
    }

    [Fact]
    public void Write_OverrideForUnknownTask_ThrowsNamingIt()
    {
        var ex = Assert.Throws<ArgumentException>(() => Write(Harbor, Result(0.68f, 0.03f, new() { ["front-door"] = 0.7f })));
        Assert.Contains("'front-door'", ex.Message);
        Assert.Contains("harbor-street.yaml", ex.Message);
    }

    [Fact]
    public void Write_FlowStyleTaskNeedingEdit_ThrowsWithLocation()
    {
        string yaml = "version: 1\ntasks:\n  - { id: hall-light, title: Light, phrases: [press the light] }\n";
        var ex = Assert.Throws<FormatException>(() => Write(yaml, Result(0.6f, 0.04f, new() { ["hall-light"] = 0.7f })));
        Assert.StartsWith("harbor-street.yaml:3:5:", ex.Message);
        Assert.Contains("block mapping", ex.Message);
    }

    [Fact]
    public void Write_InvalidYaml_ThrowsWithLineAndColumn()
    {
        var ex = Assert.Throws<FormatException>(() => Write("version: 1\ntasks:\n  - id: [unclosed\n", Result(0.6f, 0.04f)));
        Assert.Matches(@"^harbor-street\.yaml:\d+:\d+: the registry is not valid YAML", ex.Message);
    }

    [Theory]
    [InlineData(5e-05f, "0.00005")]
    [InlineData(1.2345678e-05f, "0.000012345678")]
    [InlineData(0.68f, "0.68")]
    [InlineData(0f, "0")]
    [InlineData(-2.5e-07f, "-0.00000025")]
    public void FormatNumber_SmallValues_AvoidExponent(float value, string expected)
    {
        string s = TunedRegistryWriter.FormatNumber(value);
        Assert.Equal(expected, s);
        Assert.Equal(value, float.Parse(s, CultureInfo.InvariantCulture));
    }

    [Fact]
    public void WriteFromFile_ReadsTheFile()
    {
        string path = Path.Combine(Path.GetTempPath(), $"tuning-writer-{Guid.NewGuid():N}.yaml");
        File.WriteAllText(path, Harbor);
        try
        {
            var sw = new StringWriter(CultureInfo.InvariantCulture);
            TunedRegistryWriter.WriteFromFile(path, Result(0.7f, 0.02f), "from file", sw);
            Assert.Equal("0.7", Scalar(Load(sw.ToString()), "defaults", "accept"));
        }
        finally
        {
            File.Delete(path);
        }
    }
    [Fact]
    public void Write_ModelId_ReplacesTheModelKeyInPlace()
    {
        string text = Write(Harbor, Result(0.68f, 0.03f) with { ModelId = "all-minilm-l6-v2-layers-4-6" });
        var output = Load(text);
        Assert.Equal("all-minilm-l6-v2-layers-4-6", Scalar(output, "model"));
        Assert.Contains("version: 1\nmodel: all-minilm-l6-v2-layers-4-6\ndefaults:", text.Replace("\r\n", "\n"), StringComparison.Ordinal);
    }

    [Fact]
    public void Write_ModelId_WithoutModelKey_IsAddedAfterVersion()
    {
        string yaml = Harbor.Replace("model: all-minilm-l6-v2\n", "", StringComparison.Ordinal);
        string text = Write(yaml, Result(0.68f, 0.03f) with { ModelId = "all-minilm-l6-v2-int8" });
        Assert.Equal("all-minilm-l6-v2-int8", Scalar(Load(text), "model"));
        Assert.Contains("version: 1\nmodel: all-minilm-l6-v2-int8\n", text.Replace("\r\n", "\n"), StringComparison.Ordinal);
        // Without version first, the key goes before the first key.
        string noVersion = yaml.Replace("version: 1\n", "", StringComparison.Ordinal);
        Assert.Equal("all-minilm-l6-v2-int8", Scalar(Load(Write(noVersion, Result(0.68f, 0.03f) with { ModelId = "all-minilm-l6-v2-int8" })), "model"));
    }

    [Theory]
    [InlineData("my model: v2 # test")]   // YAML indicators are quoted, not parsed as a mapping or a comment
    [InlineData("quote\"and\\slash")]
    public void Write_ModelId_NeedingQuotes_RoundTrips(string id)
        => Assert.Equal(id, Scalar(Load(Write(Harbor, Result(0.68f, 0.03f) with { ModelId = id })), "model"));

    [Theory]
    [InlineData("model: null\n")]
    [InlineData("model: ~\n")]
    [InlineData("model:\n")]
    [InlineData("model: !!null\n")]
    [InlineData("model: \"all-minilm-l6-v2\"   # quoted\n")]
    public void Write_ModelId_ReplacesAnyFormOfTheOldValue(string line)
    {
        string yaml = Harbor.Replace("model: all-minilm-l6-v2\n", line, StringComparison.Ordinal);
        var output = Load(Write(yaml, Result(0.68f, 0.03f) with { ModelId = "all-minilm-l6-v2-int8" }));
        Assert.Equal("all-minilm-l6-v2-int8", Scalar(output, "model"));
        Assert.Equal("0.68", Scalar(output, "defaults", "accept"));
    }

    [Fact]
    public void Write_ModelId_CrlfFile_KeepsItsLineEnds()
    {
        string text = Write(Harbor.Replace("\n", "\r\n", StringComparison.Ordinal).Replace("model: all-minilm-l6-v2\r\n", "", StringComparison.Ordinal),
            Result(0.68f, 0.03f) with { ModelId = "all-minilm-l6-v2-int8" });
        Assert.Contains("version: 1\r\nmodel: all-minilm-l6-v2-int8\r\n", text, StringComparison.Ordinal);
        Assert.DoesNotContain("\n", text.Replace("\r\n", "", StringComparison.Ordinal), StringComparison.Ordinal);
    }

    [Fact]
    public void Write_ModelId_FlowStyleRoot_GetsTheKey()
    {
        const string flow = "{version: 1, defaults: {accept: 0.6, margin: 0.04}, tasks: [{id: hall-light, title: Hall light, controller: {manifold: reach-press.v1, latent_dims: 1}, phrases: [turn on the hall light]}]}\n";
        var output = Load(Write(flow, Result(0.68f, 0.03f) with { ModelId = "all-minilm-l6-v2-int8" }));
        Assert.Equal("all-minilm-l6-v2-int8", Scalar(output, "model"));
        Assert.Equal("0.68", Scalar(output, "defaults", "accept"));
    }

    [Theory]
    [InlineData("null")]           // a plain null word would read back as no model at all
    [InlineData("NULL")]
    [InlineData("line\u2028break")] // a YAML line break inside a plain or quoted scalar
    public void Write_ModelId_ThatYamlWouldMisread_IsQuotedAndReadsBack(string id)
    {
        string text = Write(Harbor, Result(0.68f, 0.03f) with { ModelId = id });
        Assert.Equal(id, Scalar(Load(text), "model"));
        Assert.Contains("model: \"", text, StringComparison.Ordinal);
    }

    [Fact]
    public void Write_ModelId_MappingAsModelValue_SaysWhereAndWhat()
    {
        string yaml = Harbor.Replace("model: all-minilm-l6-v2\n", "model: {id: x}\n", StringComparison.Ordinal);
        var e = Assert.Throws<FormatException>(() => Write(yaml, Result(0.68f, 0.03f) with { ModelId = "all-minilm-l6-v2-int8" }));
        Assert.Contains("harbor-street.yaml:3:", e.Message, StringComparison.Ordinal);
        Assert.Contains("'model' must be a model id", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Write_NoModelId_LeavesTheModelKey()
        => Assert.Equal("all-minilm-l6-v2", Scalar(Load(Write(Harbor, Result(0.68f, 0.03f))), "model"));
}
