using System.Text.Json;

namespace TaskPhrase.Cli.Tests;

[Collection(CliCollection.Name)]
public class CommandTests(CliFixture cli)
{
    private static readonly string Registry = CliFixture.Example("harbor-street", "registry.yaml");
    private static readonly string Probes = CliFixture.Example("harbor-street", "probes.csv");

    [Fact]
    public void Embed_Json_ReproducesPublishedSimilarity()
    {
        // sentence-transformers Quickstart, all-MiniLM-L6-v2: 0.6660 between these two sentences.
        var (exit, output, error) = cli.Run("embed", "--json", "The weather is lovely today.", "It's so sunny outside!");
        Assert.True(exit == 0, error);
        using var doc = JsonDocument.Parse(output);
        Assert.Equal(384, doc.RootElement.GetProperty("dimensions").GetInt32());
        var v = doc.RootElement.GetProperty("vectors").EnumerateArray().Select(a => a.EnumerateArray().Select(x => x.GetSingle()).ToArray()).ToArray();
        Assert.Equal(0.6660, v[0].Zip(v[1]).Sum(p => (double)p.First * p.Second), 5e-4);
    }

    [Fact]
    public void Resolve_Json_HasTheDesignKeys()
    {
        var (exit, output, _) = cli.Run("resolve", "--registry", Registry, "--json", "could you water the basil", "make me a sandwich");
        Assert.Equal(0, exit);
        var lines = output.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(2, lines.Length);
        using var accepted = JsonDocument.Parse(lines[0]);
        var a = accepted.RootElement;
        foreach (var key in new[] { "utterance", "outcome", "task", "phrase", "score", "margin", "reason", "confirm", "controller", "candidates", "registry", "model" })
            Assert.True(a.TryGetProperty(key, out _), $"missing key {key}");
        Assert.Equal("accepted", a.GetProperty("outcome").GetString());
        Assert.Equal("water-basil", a.GetProperty("task").GetString());
        Assert.Equal("pour-arc.v2", a.GetProperty("controller").GetProperty("manifold").GetString());
        Assert.Equal(2, a.GetProperty("controller").GetProperty("latent_dims").GetInt32());
        using var rejected = JsonDocument.Parse(lines[1]);
        Assert.Equal("rejected", rejected.RootElement.GetProperty("outcome").GetString());
        Assert.Equal("out_of_scope", rejected.RootElement.GetProperty("reason").GetString());
        Assert.Equal(JsonValueKind.Null, rejected.RootElement.GetProperty("controller").ValueKind);
    }

    [Fact]
    public void Resolve_InputFromStdin_WritesJsonLinesAndReportsBadUtf8()
    {
        var (exit, output, error) = cli.RunWithInput("turn on the hall light\n\nwater the basil\nbad \uFFFD bytes\n", "resolve", "--registry", Registry, "--json", "--input", "-");
        Assert.Equal(0, exit);
        Assert.Equal(3, output.Split('\n', StringSplitOptions.RemoveEmptyEntries).Length);
        Assert.Contains("stdin:4: warning", error);
    }

    [Fact]
    public void Resolve_CorrectedSpeechSlip_ShowsTheCorrectionOnTheTerminal()
    {
        var (exit, output, _) = cli.Run("resolve", "--registry", Registry, "turn the paige");
        Assert.Equal(0, exit);
        Assert.Contains("accepted", output);
        Assert.Contains("page-turn", output);
        Assert.Contains("corrected: paige → page (sounds alike)", output);
    }

    [Fact]
    public void Resolve_ConfirmTask_SaysSoInJson()
    {
        var (_, output, _) = cli.Run("resolve", "--registry", Registry, "--json", "pour water from the kettle into my teapot");
        using var doc = JsonDocument.Parse(output);
        Assert.Equal("kettle-pour", doc.RootElement.GetProperty("task").GetString());
        Assert.True(doc.RootElement.GetProperty("confirm").GetBoolean());
    }

    [Fact]
    public void Check_ExampleRegistry_HasNoErrors()
    {
        var (exit, output, _) = cli.Run("check", "--registry", Registry, "--json");
        Assert.Equal(0, exit);
        using var doc = JsonDocument.Parse(output);
        Assert.True(doc.RootElement.GetProperty("valid").GetBoolean());
        Assert.Empty(doc.RootElement.GetProperty("errors").EnumerateArray());
    }

    [Fact]
    public void Check_BrokenRegistry_ExitsOneWithLocatedErrors()
    {
        string path = Path.Combine(Path.GetTempPath(), $"tp-broken-{Guid.NewGuid():N}.yaml");
        File.WriteAllText(path, "version: 1\ntasks:\n  - id: water-basil\n    title: Water\n    controler: {manifold: a, latent_dims: 1}\n    phrases: [water the basil]\n");
        try
        {
            var (exit, output, _) = cli.Run("check", "--registry", path, "--no-lint");
            Assert.Equal(1, exit);
            Assert.Contains($"{path}:5:5: error unknown-key", output);
            Assert.Contains("controller", output);
        }
        finally { File.Delete(path); }
    }

    [Fact]
    public void BuildAndAudit_LoadTheModelThroughTheBatchLoader_ResolveThroughTheSingleCommandOne()
    {
        string index = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.idx");
        var loaded = new List<string>();
        var context = new CliContext
        {
            Out = new StringWriter(),
            Err = new StringWriter(),
            LoadModel = _ => { loaded.Add("single"); return cli.Embedder; },
            LoadBatchModel = _ => { loaded.Add("batch"); return cli.Embedder; },
            OwnsModels = false,
        };
        try
        {
            Assert.Equal(0, CliApp.Run(["build", "--registry", Registry, "--output", index], context));
            Assert.Equal(0, CliApp.Run(["resolve", "--index", index, "water the basil"], context));
            Assert.Equal(0, CliApp.Run(["audit", "--index", index, "--probes", Probes], context));
            Assert.Equal(["batch", "single", "batch"], loaded);
        }
        finally { File.Delete(index); }
    }

    [Fact]
    public void Build_ThenResolveFromIndex_GivesSameDecisions_AndFlippedByteIsRefused()
    {
        string index = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.idx");
        try
        {
            var (buildExit, _, _) = cli.Run("build", "--registry", Registry, "--output", index);
            Assert.Equal(0, buildExit);
            string[] utterances = ["could you water the basil", "throw the basil out of the window", "don't turn on the hall light"];
            var fromRegistry = cli.Run(["resolve", "--registry", Registry, "--json", .. utterances]).Out;
            var fromIndex = cli.Run(["resolve", "--index", index, "--json", .. utterances]).Out;
            static string Strip(string jsonl) => string.Join('\n', jsonl.Split('\n', StringSplitOptions.RemoveEmptyEntries)
                .Select(l => System.Text.RegularExpressions.Regex.Replace(l, "\"elapsed_ms\":[0-9.eE+-]+", "")));
            Assert.Equal(Strip(fromRegistry), Strip(fromIndex));

            var bytes = File.ReadAllBytes(index);
            bytes[bytes.Length / 2] ^= 0x40;
            File.WriteAllBytes(index, bytes);
            var (exit, _, error) = cli.Run("resolve", "--index", index, "water the basil");
            Assert.Equal(2, exit);
            Assert.Single(error.Split('\n', StringSplitOptions.RemoveEmptyEntries));
            Assert.StartsWith("error: ", error);
            Assert.DoesNotContain("   at ", error);
        }
        finally { File.Delete(index); }
    }

    [Fact]
    public void Audit_BudgetMissed_ExitsOne_AndWritesHtml()
    {
        string html = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.html");
        try
        {
            var (exit, output, _) = cli.Run("audit", "--registry", Registry, "--probes", Probes, "--json", "--html", html, "--min-accuracy", "0.999");
            Assert.Equal(1, exit);
            using var doc = JsonDocument.Parse(output);
            foreach (var key in new[] { "in_scope_accuracy", "wrong_task_rate", "false_reject_rate", "false_accept_rate", "oos_recall", "auroc", "fpr_at_95_tpr", "counts" })
                Assert.True(doc.RootElement.TryGetProperty(key, out _), $"missing key {key}");
            Assert.Contains("<svg", File.ReadAllText(html));
        }
        finally { File.Delete(html); }
    }

    [Fact]
    public void Tune_WithBudgets_WritesRegistryThatChecksClean()
    {
        string tuned = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.yaml");
        try
        {
            var (exit, output, _) = cli.Run("tune", "--registry", Registry, "--probes", Probes, "--max-false-accept", "0.05", "--max-wrong-task", "0", "--output", tuned, "--json");
            Assert.Equal(0, exit);
            using var doc = JsonDocument.Parse(output);
            Assert.True(doc.RootElement.GetProperty("feasible").GetBoolean());
            Assert.True(doc.RootElement.GetProperty("false_accept_rate").GetProperty("value").GetDouble() <= 0.05);
            Assert.Equal(0, cli.Run("check", "--registry", tuned, "--no-lint").Exit);
            Assert.Contains("taskphrase tune", File.ReadAllText(tuned));
        }
        finally { File.Delete(tuned); }
    }

    [Fact]
    public void Probes_SameSeed_SameSuite()
    {
        var first = cli.Run("probes", "--registry", Registry, "--output", "-", "--seed", "3", "--count", "60").Out;
        var second = cli.Run("probes", "--registry", Registry, "--output", "-", "--seed", "3", "--count", "60").Out;
        var other = cli.Run("probes", "--registry", Registry, "--output", "-", "--seed", "4", "--count", "60").Out;
        Assert.Equal(first, second);
        Assert.NotEqual(first, other);
        Assert.StartsWith("utterance,expect,kind,note", first);
    }

    [Fact]
    public void Probes_ReportsTheSmallestBudgetsTheSuiteCanShowByItsBounds()
    {
        string suite = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.csv");
        try
        {
            var (exit, output, error) = cli.Run("probes", "--registry", Registry, "--output", suite, "--count", "120", "--json");
            Assert.True(exit == 0, error);
            using var doc = System.Text.Json.JsonDocument.Parse(output);
            var root = doc.RootElement;
            // Counted from the written file, and the bound of 0 of n from Wilson's formula (Wilson 1927): z² / (n + z²).
            var rows = TaskPhrase.Evaluation.ProbeSuite.Load(suite).Cases;
            int outOfScope = rows.Count(r => !r.IsInScope), inScope = rows.Count - outOfScope;
            Assert.True(outOfScope > 0 && inScope > 0);
            Assert.Equal(outOfScope, root.GetProperty("out_of_scope").GetInt32());
            Assert.Equal(inScope, root.GetProperty("in_scope").GetInt32());
            const double z2 = 1.959964 * 1.959964;
            Assert.Equal(z2 / (outOfScope + z2), root.GetProperty("smallest_conservative_false_accept_budget").GetDouble(), 6);
            Assert.Equal(z2 / (inScope + z2), root.GetProperty("smallest_conservative_wrong_task_budget").GetDouble(), 6);
            var (humanExit, human, _) = cli.Run("probes", "--registry", Registry, "--output", suite, "--count", "120");
            Assert.Equal(0, humanExit);
            Assert.Contains("the smallest budgets this suite can show", human);
        }
        finally { File.Delete(suite); }
    }

    [Theory]
    [InlineData("audit", "--registry", "x.yaml", "--probes", "p.csv", "--max-false-accept", "2")]
    [InlineData("resolve", "--nonsense-option")]
    [InlineData("frobnicate")]
    public void BadUsage_ExitsTwoWithOneLineErrors(params string[] args)
    {
        var (exit, _, error) = cli.Run(args);
        Assert.Equal(2, exit);
        Assert.StartsWith("error: ", error);
        Assert.DoesNotContain("   at ", error);
    }

    [Fact]
    public void Resolve_MissingRegistry_ExitsTwo()
    {
        var (exit, _, error) = cli.Run("resolve", "--registry", "/nonexistent/registry.yaml", "water the basil");
        Assert.Equal(2, exit);
        Assert.Contains("/nonexistent/registry.yaml", error);
    }
}
