using System.Globalization;
using System.Runtime.CompilerServices;
using System.Text.Json;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

public class AuditJsonTests
{
    private static readonly AuditBudget Budget = new(maxFalseAccept: 0.1, maxWrongTask: 0.2, minAccuracy: 0.4);

    /// <summary>
    /// Exact golden file. Its numbers were checked by hand against the AuditScenario table (see AuditEvaluatorTests);
    /// to regenerate after an intended change run the tests with TASKPHRASE_UPDATE_GOLDEN=1 and review the diff.
    /// </summary>
    [Fact]
    public void ToJson_ScenarioReport_MatchesGoldenFile()
    {
        string json = AuditJson.ToJson(AuditScenario.Report(), Budget);
        if (Environment.GetEnvironmentVariable("TASKPHRASE_UPDATE_GOLDEN") == "1") File.WriteAllText(SourceGoldenPath(), json);

        string golden = Path.Combine(AppContext.BaseDirectory, "data", "audit", "harbor-street-audit.json");
        Assert.Equal(File.ReadAllText(golden).ReplaceLineEndings("\n"), json);
    }

    [Fact]
    public void ToJson_Scenario_HasProductKeysAndRateShape()
    {
        using var doc = JsonDocument.Parse(AuditJson.ToJson(AuditScenario.Report()));
        var root = doc.RootElement;

        // Keys named in product.md, "Audit metrics" and "audit --json".
        foreach (var key in new[] { "in_scope_accuracy", "wrong_task_rate", "false_reject_rate", "false_accept_rate", "oos_recall", "auroc", "fpr_at_95_tpr", "counts" })
            Assert.True(root.TryGetProperty(key, out _), $"missing key {key}");
        var rate = root.GetProperty("false_accept_rate");
        Assert.Equal(["value", "count", "total", "ci_low", "ci_high"], rate.EnumerateObject().Select(p => p.Name));
        Assert.Equal(1, rate.GetProperty("count").GetInt32());
        Assert.Equal(6, rate.GetProperty("total").GetInt32());
        Assert.Equal(AuditScenario.RegistryHash, root.GetProperty("registry").GetString());
        Assert.Equal(AuditScenario.ModelHash, root.GetProperty("model_sha256").GetString());
        Assert.Equal("2025-06-11T09:30:00+00:00", root.GetProperty("date").GetString());
        Assert.Equal(12, root.GetProperty("counts").GetProperty("probes").GetInt32());
        Assert.Equal(3, root.GetProperty("counts").GetProperty("by_reason").GetProperty("out_of_scope").GetInt32());
        Assert.False(root.TryGetProperty("budget", out _)); // only written when a budget is given
    }

    [Fact]
    public void ToJson_WithBudget_WritesPassedAndViolations()
    {
        using var doc = JsonDocument.Parse(AuditJson.ToJson(AuditScenario.Report(), Budget));
        var budget = doc.RootElement.GetProperty("budget");
        Assert.False(budget.GetProperty("passed").GetBoolean());
        Assert.Equal("false_accept_rate", Assert.Single(budget.GetProperty("violations").EnumerateArray()).GetProperty("metric").GetString());
    }

    [Fact]
    public void ToJson_UndefinedNumbers_AreNull()
    {
        var report = AuditEvaluator.Evaluate([], [], AuditScenario.Context());
        using var doc = JsonDocument.Parse(AuditJson.ToJson(report));
        Assert.Equal(JsonValueKind.Null, doc.RootElement.GetProperty("auroc").ValueKind);
        Assert.Equal(JsonValueKind.Null, doc.RootElement.GetProperty("in_scope_accuracy").GetProperty("value").ValueKind);
        Assert.Equal(0, doc.RootElement.GetProperty("in_scope_accuracy").GetProperty("ci_low").GetDouble());
    }

    [Fact]
    public void ToJson_ScriptInUtterance_IsEscapedForHtmlEmbedding()
    {
        string json = AuditJson.ToJson(AuditScenario.Report());
        Assert.DoesNotContain("<script>", json);
        Assert.Contains("\\u003Cscript\\u003E", json);
        using var doc = JsonDocument.Parse(json);
        Assert.Contains(doc.RootElement.GetProperty("cases").EnumerateArray(), c => c.GetProperty("utterance").GetString()!.Contains("<script>"));
    }

    [Fact]
    public void ToJson_UnderGermanCulture_IsIdentical()
    {
        string invariant = AuditJson.ToJson(AuditScenario.Report(), Budget);
        var previous = CultureInfo.CurrentCulture;
        try
        {
            CultureInfo.CurrentCulture = CultureInfo.GetCultureInfo("de-DE");
            Assert.Equal(invariant, AuditJson.ToJson(AuditScenario.Report(), Budget));
        }
        finally
        {
            CultureInfo.CurrentCulture = previous;
        }
    }

    [Fact]
    public void Write_ToStream_IsUtf8WithoutBomAndEndsWithNewLine()
    {
        using var stream = new MemoryStream();
        AuditJson.Write(AuditScenario.Report(), stream, indented: false);
        byte[] bytes = stream.ToArray();
        Assert.Equal((byte)'{', bytes[0]);
        Assert.Equal((byte)'\n', bytes[^1]);
        Assert.DoesNotContain((byte)'\n', bytes[..^1]);
    }

    private static string SourceGoldenPath([CallerFilePath] string thisFile = "")
        => Path.GetFullPath(Path.Combine(Path.GetDirectoryName(thisFile)!, "..", "..", "data", "audit", "harbor-street-audit.json"));
}
