using System.Globalization;
using System.Text.RegularExpressions;
using TaskPhrase.Evaluation;
using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Evaluation;

public partial class AuditHtmlReportTests
{
    private static readonly AuditBudget Budget = new(maxFalseAccept: 0.1, maxWrongTask: 0.2, minAccuracy: 0.4);
    private static readonly string Html = AuditHtmlReport.ToHtml(AuditScenario.Report(), Budget);

    [Fact]
    public void ToHtml_ScriptInUtterance_ComesOutEscaped()
    {
        // The scenario's look-alike probe contains "<script>alert(1)</script>" (untrusted input).
        Assert.Contains("pour the kettle on my &lt;script&gt;alert(1)&lt;/script&gt; hand", Html, StringComparison.Ordinal);
        Assert.DoesNotContain("<script", Html, StringComparison.OrdinalIgnoreCase);
    }

    [Fact]
    public void ToHtml_Report_IsSelfContained()
    {
        // No scripts, no external resources: every href is an in-page anchor, nothing has a src, CSS loads nothing.
        Assert.DoesNotMatch(SrcAttribute(), Html);
        foreach (Match m in HrefAttribute().Matches(Html)) Assert.StartsWith("#", m.Groups[1].Value);
        Assert.DoesNotContain("url(", Html);
        Assert.DoesNotContain("@import", Html);
        Assert.DoesNotContain("@font-face", Html);
        // The only URL is the SVG namespace name, which is an identifier, not a download.
        Assert.Equal(HttpUrl().Matches(Html).Count, Regex.Matches(Html, "xmlns=\"http://www.w3.org/2000/svg\"").Count);
        Assert.Contains("Content-Security-Policy\" content=\"default-src 'none'", Html);
    }

    [Fact]
    public void ToHtml_Report_HasEveryChartWithAccessibleTitleAndAxisLabels()
    {
        Assert.Equal(4, Regex.Matches(Html, "<svg ").Count);
        foreach (var id in new[] { "chart-scores", "chart-roc", "chart-sweep", "chart-tasks" })
        {
            Assert.Contains($"<svg id=\"{id}\"", Html);
            Assert.Contains($"role=\"img\" aria-labelledby=\"{id}-title {id}-desc\"", Html);
            Assert.Contains($"<title id=\"{id}-title\">", Html);
            Assert.Contains($"<desc id=\"{id}-desc\">", Html);
        }
        Assert.Contains("<title id=\"chart-roc-title\">ROC curve (AUROC 0.750)</title>", Html); // 27/36 pairs, hand count
        Assert.Contains("best-match score (cosine similarity)", Html);
        Assert.Contains("false-positive rate (out-of-scope scored ≥ t)", Html);
        Assert.Contains("true-positive rate (in-scope scored ≥ t)", Html);
        Assert.Contains("accept threshold t (score ≥ t accepted)", Html);
        Assert.Contains("accept ≥ 0.60", Html);
        Assert.Contains(">precision (upper bar)</text>", Html);
    }

    [Fact]
    public void ToHtml_Header_ShowsSuiteRegistryModelDateAndThresholds()
    {
        Assert.Contains("<title>TaskPhrase audit: harbor-street-audit.csv</title>", Html);
        Assert.Contains(AuditScenario.RegistryHash, Html);
        Assert.Contains($"all-minilm-l6-v2 <code class=\"hash\">{AuditScenario.ModelHash}</code>", Html);
        Assert.Contains("2025-06-11 09:30:00 UTC+00:00", Html);
        Assert.Contains("accept 0.60, margin 0.04; per task: kettle-pour 0.70", Html);
    }

    [Fact]
    public void ToHtml_WithBudget_MarksEachBudgetAndTheVerdict()
    {
        Assert.Contains("1 budget not met", Html);
        // False-accept rate 1/6 = 16.7 % is above 10 %; wrong-task 16.7 % ≤ 20 %; accuracy 50 % ≥ 40 %.
        Assert.Matches(new Regex("<code>false_accept_rate</code>.*?≤ 10.0&nbsp;% <span class=\"fail\">", RegexOptions.Singleline), Html);
        Assert.Matches(new Regex("<code>wrong_task_rate</code>.*?≤ 20.0&nbsp;% <span class=\"pass\">", RegexOptions.Singleline), Html);
        Assert.Matches(new Regex("<code>in_scope_accuracy</code>.*?≥ 40.0&nbsp;% <span class=\"pass\">", RegexOptions.Singleline), Html);
        Assert.Contains("16.7&nbsp;%", Html);
    }

    [Fact]
    public void ToHtml_WithoutBudget_HasNoVerdict()
        => Assert.DoesNotContain("class=\"verdict", AuditHtmlReport.ToHtml(AuditScenario.Report()));

    [Fact]
    public void ToHtml_Report_HasTablesForKindsReasonsConfusionAndWorstCases()
    {
        foreach (var caption in new[]
        {
            "By probe kind", "By reason", "Probes by expected label and result",
            "False accepts: out-of-scope probes accepted", "Wrong task: in-scope probes accepted as another task",
            "False rejects: in-scope probes rejected or ambiguous", "Failures in suite order",
        })
            Assert.Contains("<caption>" + caption, Html);
        Assert.Contains("4 of 12 probes did not come out as expected", Html); // in-scope rows 4, 5, 6 and out-of-scope row 9
    }

    [Fact]
    public void ToHtml_InvisibleCharacters_AreShownAsCodePoints()
    {
        string evil = "water the basil\u202E lio";
        var probes = new[] { new ProbeCase(evil, ProbeCase.Reject, "bidi", null, 2), new ProbeCase("\t ", "water-basil", "blank", null, 3) };
        var resolutions = new[]
        {
            AuditScenario.Resolve(evil, ResolutionOutcome.Accepted, "water-basil", 0.9f, RejectionReason.None),
            AuditScenario.Resolve("\t ", ResolutionOutcome.Rejected, null, null, RejectionReason.Empty),
        };
        string html = AuditHtmlReport.ToHtml(AuditEvaluator.Evaluate(probes, resolutions, AuditScenario.Context()));

        Assert.DoesNotContain("\u202E", html, StringComparison.Ordinal); // ordinal: culture-aware search ignores U+202E
        Assert.Contains("(white space only: U+0009 U+0020)", html, StringComparison.Ordinal);
        Assert.Contains("<bdi class=\"utt\">water the basil<span class=\"mark\">U+202E</span> lio</bdi>", html, StringComparison.Ordinal);
    }

    [Fact]
    public void ToHtml_Markup_IsBalanced()
    {
        // Structural check independent of any browser: every non-void element that opens also closes, in order.
        var stack = new Stack<string>();
        string[] voids = ["meta", "link", "br", "hr", "img", "input", "wbr"];
        foreach (Match m in Tag().Matches(Html))
        {
            string name = m.Groups[2].Value.ToLowerInvariant();
            bool closing = m.Groups[1].Value == "/", selfClosing = m.Groups[3].Value == "/";
            if (voids.Contains(name) || selfClosing) continue;
            if (!closing) { stack.Push(name); continue; }
            Assert.True(stack.Count > 0, $"</{name}> without an open element");
            Assert.Equal(stack.Pop(), name);
        }
        Assert.Empty(stack);
    }

    [Fact]
    public void ToHtml_UnderGermanCulture_IsIdentical()
    {
        var previous = CultureInfo.CurrentCulture;
        try
        {
            CultureInfo.CurrentCulture = CultureInfo.GetCultureInfo("de-DE");
            Assert.Equal(Html, AuditHtmlReport.ToHtml(AuditScenario.Report(), Budget));
            Assert.Equal("de-DE", CultureInfo.CurrentCulture.Name); // restored
        }
        finally
        {
            CultureInfo.CurrentCulture = previous;
        }
        Assert.DoesNotMatch(new Regex(@"\d,\d{2}&nbsp;%"), Html);
    }

    [Fact]
    public void ToHtml_EmptyAndOneSidedReports_StillRenderEveryChart()
    {
        var empty = AuditHtmlReport.ToHtml(AuditEvaluator.Evaluate([], [], AuditScenario.Context()));
        var inScopeOnly = AuditHtmlReport.ToHtml(AuditEvaluator.Evaluate(AuditScenario.Probes.Take(6).ToArray(), AuditScenario.Resolutions.Take(6).ToArray(), AuditScenario.Context()), Budget);

        Assert.Equal(4, Regex.Matches(empty, "<svg ").Count);
        Assert.Equal(4, Regex.Matches(inScopeOnly, "<svg ").Count);
        Assert.Contains("needs in-scope and out-of-scope probes", inScopeOnly);
        Assert.Contains("The suite has no out-of-scope probes", inScopeOnly);
        Assert.DoesNotContain("NaN", empty);
        Assert.DoesNotContain("NaN", inScopeOnly);
        Assert.DoesNotContain("Infinity", inScopeOnly);
    }

    [Fact]
    public void Write_ToTextWriter_WritesTheSamePage()
    {
        var writer = new StringWriter();
        AuditHtmlReport.Write(AuditScenario.Report(), writer, Budget);
        Assert.Equal(Html, writer.ToString());
    }

    [GeneratedRegex(@"\ssrc\s*=", RegexOptions.IgnoreCase)]
    private static partial Regex SrcAttribute();

    [GeneratedRegex("\\shref\\s*=\\s*\"([^\"]*)\"", RegexOptions.IgnoreCase)]
    private static partial Regex HrefAttribute();

    [GeneratedRegex("https?://", RegexOptions.IgnoreCase)]
    private static partial Regex HttpUrl();

    [GeneratedRegex(@"<(/?)([a-zA-Z][a-zA-Z0-9]*)\b[^>]*?(/?)>")]
    private static partial Regex Tag();
}
