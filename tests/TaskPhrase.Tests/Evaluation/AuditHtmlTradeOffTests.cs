using System.Globalization;
using System.Text.RegularExpressions;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>The wrong-task trade-off section of the HTML report (hand-made curve of <see cref="AuditScenario.TradeOff"/>).</summary>
public partial class AuditHtmlTradeOffTests
{
    private static readonly string Html = AuditHtmlReport.ToHtml(AuditScenario.Report(), null, AuditScenario.TradeOff);

    [Fact]
    public void ToHtml_WithTradeOff_AddsAnAccessibleChartAndATable()
    {
        Assert.Equal(5, Regex.Matches(Html, "<svg ").Count);
        Assert.Contains("<svg id=\"chart-tradeoff\"", Html);
        Assert.Contains("role=\"img\" aria-labelledby=\"chart-tradeoff-title chart-tradeoff-desc\"", Html);
        Assert.Contains("<title id=\"chart-tradeoff-title\">Wrong-task rate against in-scope accuracy</title>", Html);
        Assert.Contains("wrong task 0.100, accuracy 0.400", Html);
        Assert.Contains("wrong-task rate (in-scope probes accepted as another task)", Html);
        Assert.Contains("<a href=\"#tradeoff\">Trade-off</a>", Html);
        Assert.Contains("<section id=\"tradeoff\">", Html);
        // One table row per cap; the unreachable one says so.
        Assert.Contains("<th scope=\"row\">≤ 0.0&nbsp;%</th><td colspan=\"5\" class=\"muted\">not reachable on this suite</td>", Html);
        Assert.Contains("<th scope=\"row\">≤ 10.0&nbsp;%</th><td class=\"num\">40.0&nbsp;%</td><td class=\"num\">10.0&nbsp;%</td>", Html);
    }

    [Fact]
    public void ToHtml_TradeOffPoints_HigherAccuracyIsHigherAndMoreWrongTaskIsFurtherRight()
    {
        var points = CurvePoint().Matches(Html).Select(m => (X: Num(m.Groups[1].Value), Y: Num(m.Groups[2].Value))).ToList();
        Assert.Equal(4, points.Count); // the four reachable caps
        // Sorted by wrong-task rate 0.05, 0.10, 0.1667, 0.1667 with accuracy 0.25, 0.40, 0.50, 0.50: x grows, y (SVG down) shrinks.
        Assert.True(points[0].X < points[1].X && points[1].X < points[2].X && points[2].X == points[3].X);
        Assert.True(points[0].Y > points[1].Y && points[1].Y > points[2].Y && points[2].Y == points[3].Y);
        // Linear axes: equal steps in rate are equal steps on the page (0.05 → 0.10 and 0.10 → 0.15 of accuracy 0.25 → 0.40 → 0.50).
        double perUnitA = (points[1].Y - points[0].Y) / 0.15, perUnitB = (points[2].Y - points[1].Y) / 0.10;
        Assert.True(Math.Abs(perUnitA - perUnitB) < 0.5, $"{perUnitA} vs {perUnitB} pixels per unit of accuracy");
        // The registry's own operating point (wrong task 1 of 6 probes, accuracy 3 of 6 in the scenario) sits on the last cap's point.
        var now = NowMarker().Match(Html);
        Assert.True(now.Success);
        Assert.Equal(points[3].X, Num(now.Groups[1].Value) + 5, 0);
        Assert.Equal(points[3].Y, Num(now.Groups[2].Value) + 5, 0);
    }

    [Fact]
    public void ToHtml_WithoutTradeOff_HasNoTradeOffSection()
    {
        string html = AuditHtmlReport.ToHtml(AuditScenario.Report());
        Assert.DoesNotContain("chart-tradeoff", html);
        Assert.DoesNotContain("#tradeoff", html);
    }

    private static double Num(string s) => double.Parse(s, CultureInfo.InvariantCulture);

    [GeneratedRegex("<circle class=\"curve-point\" cx=\"([0-9.]+)\" cy=\"([0-9.]+)\"")]
    private static partial Regex CurvePoint();

    [GeneratedRegex("<rect class=\"operating-point\" x=\"([0-9.]+)\" y=\"([0-9.]+)\"")]
    private static partial Regex NowMarker();
}
