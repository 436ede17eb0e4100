using System.Text.Json;

namespace TaskPhrase.Cli.Tests;

/// <summary>
/// <c>tune</c> with the joint scoring search: restriction, infeasible budgets, the written scoring key; budgets read by
/// their confidence bounds (<c>tune --conservative</c>, <c>audit --conservative</c>).
/// </summary>
[Collection(CliCollection.Name)]
public class TuneCommandTests(CliFixture cli)
{
    private static readonly string Registry = CliFixture.Example("harbor-street", "registry.yaml");
    private static readonly string Probes = CliFixture.Example("harbor-street", "probes.csv");

    [Fact]
    public void Tune_Strategies_SearchesOnlyThoseAndWritesTheChosenScoring()
    {
        string tuned = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.yaml");
        try
        {
            var (exit, output, error) = cli.Run("tune", "--registry", Registry, "--probes", Probes, "--max-false-accept", "0.05", "--max-wrong-task", "0",
                "--strategies", "centroid,whitened", "--output", tuned, "--json");
            Assert.True(exit == 0, error);
            using var doc = JsonDocument.Parse(output);
            var searched = doc.RootElement.GetProperty("searched").EnumerateArray().ToList();
            Assert.Equal(5, searched.Count); // centroid + whitened at four shrinkages
            Assert.All(searched, s => Assert.Contains(s.GetProperty("scoring").GetProperty("strategy").GetString(), new[] { "centroid", "whitened" }));
            var scoring = doc.RootElement.GetProperty("scoring");
            string strategy = scoring.GetProperty("strategy").GetString()!;
            // The chosen setting is the searched one with the highest in-scope accuracy among the feasible ones.
            double best = searched.Where(s => s.GetProperty("feasible").GetBoolean()).Max(s => s.GetProperty("in_scope_accuracy").GetProperty("value").GetDouble());
            Assert.Equal(best, doc.RootElement.GetProperty("in_scope_accuracy").GetProperty("value").GetDouble());
            string text = File.ReadAllText(tuned);
            Assert.Contains(scoring.GetProperty("shrinkage").ValueKind == JsonValueKind.Null ? $"scoring: {strategy}" : $"  strategy: {strategy}", text);
            Assert.Equal(5, error.Split('\n').Count(l => l.StartsWith('[') && l.Contains("in-scope accuracy")));
            // The tuned copy audits to the same figures on the same suite.
            var (auditExit, audit, _) = cli.Run("audit", "--registry", tuned, "--probes", Probes, "--json");
            Assert.Equal(0, auditExit);
            using var a = JsonDocument.Parse(audit);
            Assert.Equal(best, a.RootElement.GetProperty("in_scope_accuracy").GetProperty("value").GetDouble(), 9);
        }
        finally { File.Delete(tuned); }
    }

    [Fact]
    public void Tune_BudgetsNobodyCanMeet_ExitsOneWithTheBestItCouldDo()
    {
        // An out-of-scope row that is an approved phrase is accepted by every rule (exact match): a zero budget is infeasible.
        string suite = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.csv");
        string tuned = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.yaml");
        try
        {
            File.WriteAllText(suite, File.ReadAllText(Probes).TrimEnd() + "\nwater the basil,reject,out-of-domain,approved phrase marked out of scope\n");
            var (exit, output, _) = cli.Run("tune", "--registry", Registry, "--probes", suite, "--max-false-accept", "0", "--max-wrong-task", "0",
                "--strategies", "centroid,best-phrase", "--output", tuned, "--json");
            Assert.Equal(1, exit);
            using var doc = JsonDocument.Parse(output);
            Assert.False(doc.RootElement.GetProperty("feasible").GetBoolean());
            Assert.Equal(JsonValueKind.Null, doc.RootElement.GetProperty("output").ValueKind);
            Assert.False(File.Exists(tuned));
            Assert.True(doc.RootElement.GetProperty("false_accept_rate").GetProperty("count").GetInt32() >= 1);
            Assert.Contains(doc.RootElement.GetProperty("scoring").GetProperty("strategy").GetString(), new[] { "centroid", "best-phrase" });
            Assert.All(doc.RootElement.GetProperty("searched").EnumerateArray(), s => Assert.False(s.GetProperty("feasible").GetBoolean()));

            var (humanExit, human, _) = cli.Run("tune", "--registry", Registry, "--probes", suite, "--max-false-accept", "0", "--max-wrong-task", "0",
                "--strategies", "centroid", "--output", tuned);
            Assert.Equal(1, humanExit);
            Assert.Contains("no setting meets the budgets", human);
            Assert.Contains("scoring centroid", human);
        }
        finally
        {
            File.Delete(suite);
            File.Delete(tuned);
        }
    }

    [Theory]
    [InlineData("centroid,heads", "'heads' is not a scoring strategy")]
    [InlineData(",", "Name at least one scoring strategy")]
    public void Tune_BadStrategies_IsAUsageError(string strategies, string expected)
    {
        var (exit, _, error) = cli.Run("tune", "--registry", Registry, "--probes", Probes, "--max-false-accept", "0.05", "--strategies", strategies, "--output", "/dev/null");
        Assert.Equal(2, exit);
        Assert.Contains(expected, error);
    }

    [Fact]
    public void Tune_StrategiesWithCoverage_IsAUsageError()
    {
        var (exit, _, error) = cli.Run("tune", "--registry", Registry, "--probes", Probes, "--coverage", "0.9", "--strategies", "head", "--output", "/dev/null");
        Assert.Equal(2, exit);
        Assert.Contains("--strategies applies to budget tuning", error);
    }

    [Fact]
    public void Tune_Conservative_MeetsTheBudgetsByTheirUpperBoundsAndSaysSo()
    {
        // probes.csv holds 126 out-of-scope and 127 in-scope probes. Read by the upper end of the 95 % Wilson interval
        // (Wilson 1927), a 5 % budget then allows at most one of each (1/126 → 4.4 %, 2/126 → 5.6 %), where point
        // rates would allow six false accepts.
        string tuned = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.yaml");
        try
        {
            var (exit, output, error) = cli.Run("tune", "--registry", Registry, "--probes", Probes, "--max-false-accept", "0.05", "--max-wrong-task", "0.05",
                "--strategies", "centroid", "--conservative", "--output", tuned, "--json");
            Assert.True(exit == 0, error);
            using var doc = JsonDocument.Parse(output);
            Assert.True(doc.RootElement.GetProperty("conservative").GetBoolean());
            var fa = doc.RootElement.GetProperty("false_accept_rate");
            var wrong = doc.RootElement.GetProperty("wrong_task_rate");
            Assert.Equal(126, fa.GetProperty("total").GetInt32());
            Assert.True(fa.GetProperty("ci_high").GetDouble() <= 0.05, output);
            Assert.True(wrong.GetProperty("ci_high").GetDouble() <= 0.05, output);
            Assert.InRange(fa.GetProperty("count").GetInt32(), 0, 1);
            Assert.Contains("judged by the upper end of its 95 % Wilson interval", File.ReadAllText(tuned));
            // The tuned copy passes audit --conservative with the same budgets on the same suite.
            var (auditExit, _, auditError) = cli.Run("audit", "--registry", tuned, "--probes", Probes, "--max-false-accept", "0.05", "--max-wrong-task", "0.05", "--conservative");
            Assert.True(auditExit == 0, auditError);

            var (pointExit, point, _) = cli.Run("tune", "--registry", Registry, "--probes", Probes, "--max-false-accept", "0.05", "--max-wrong-task", "0.05",
                "--strategies", "centroid", "--output", tuned, "--json");
            Assert.Equal(0, pointExit);
            using var p = JsonDocument.Parse(point);
            Assert.False(p.RootElement.GetProperty("conservative").GetBoolean());
            Assert.True(p.RootElement.GetProperty("false_accept_rate").GetProperty("value").GetDouble() <= 0.05);
            Assert.DoesNotContain("Wilson interval)", File.ReadAllText(tuned));
        }
        finally { File.Delete(tuned); }
    }

    [Fact]
    public void Tune_ConservativeWithCoverage_IsAUsageError()
    {
        var (exit, _, error) = cli.Run("tune", "--registry", Registry, "--probes", Probes, "--coverage", "0.9", "--conservative", "--output", "/dev/null");
        Assert.Equal(2, exit);
        Assert.Contains("drop --conservative", error);
    }

    [Fact]
    public void Audit_Conservative_JudgesTheBudgetByTheUpperBound()
    {
        // With the built-in thresholds probes.csv gets 7 of 126 false accepts: 5.6 %, upper 95 % Wilson bound 11.0 %.
        var (pointExit, _, pointError) = cli.Run("audit", "--registry", Registry, "--probes", Probes, "--max-false-accept", "0.08");
        Assert.True(pointExit == 0, pointError);
        var (exit, output, _) = cli.Run("audit", "--registry", Registry, "--probes", Probes, "--max-false-accept", "0.08", "--conservative");
        Assert.Equal(1, exit);
        Assert.Contains("the upper 95 % bound of false_accept_rate", output);
        var (jsonExit, json, _) = cli.Run("audit", "--registry", Registry, "--probes", Probes, "--max-false-accept", "0.08", "--conservative", "--json");
        Assert.Equal(1, jsonExit);
        using var doc = JsonDocument.Parse(json);
        var budget = doc.RootElement.GetProperty("budget");
        Assert.True(budget.GetProperty("use_confidence_bound").GetBoolean());
        Assert.False(budget.GetProperty("passed").GetBoolean());
    }

    [Fact]
    public void Audit_ConservativeWithoutABudget_IsAUsageError()
    {
        var (exit, _, error) = cli.Run("audit", "--registry", Registry, "--probes", Probes, "--conservative");
        Assert.Equal(2, exit);
        Assert.Contains("--conservative judges budgets", error);
    }
}
