using System.Text;
using static TaskPhrase.Evaluation.HtmlText;

namespace TaskPhrase.Evaluation;

// The wrong-task trade-off: what a stricter wrong-task budget costs in in-scope accuracy on this suite.
public static partial class AuditHtmlReport
{
    private static void TradeOffSection(StringBuilder sb, AuditReport report, IReadOnlyList<TradeOffPoint> curve)
    {
        sb.Append("<section id=\"tradeoff\">\n<h2>Wrong task against accuracy</h2>\n");
        sb.Append("<p class=\"lead\">What a stricter wrong-task budget costs: for each cap, the best in-scope accuracy this suite allows with one accept threshold and margin, ")
          .Append("with false accepts held at or below the current rate. The thresholds are re-chosen on this suite for each point, so the curve is optimistic; the square is the registry as it stands.</p>\n<figure>");
        TradeOffChart(sb, report, curve);
        sb.Append("<figcaption>Accepting the wrong task is the dangerous error: read off how much accuracy each lower wrong-task rate costs before choosing <code>tune --max-wrong-task</code>.</figcaption></figure>\n");
        sb.Append("<table class=\"data\">\n<caption>Best in-scope accuracy under each wrong-task cap (false accepts ≤ current rate)</caption>\n");
        sb.Append("<thead><tr><th scope=\"col\">Wrong-task cap</th><th scope=\"col\">In-scope accuracy</th><th scope=\"col\">Wrong task</th><th scope=\"col\">False accept</th><th scope=\"col\">Accept</th><th scope=\"col\">Margin</th></tr></thead>\n<tbody>\n");
        foreach (var p in curve)
        {
            sb.Append($"<tr><th scope=\"row\">≤ {Percent(p.MaxWrongTask)}</th>");
            if (p.Feasible)
                sb.Append($"<td class=\"num\">{Percent(p.InScopeAccuracy)}</td><td class=\"num\">{Percent(p.WrongTaskRate)}</td><td class=\"num\">{Percent(p.FalseAcceptRate)}</td><td class=\"num\">{Format(p.Accept ?? 0, "0.000")}</td><td class=\"num\">{Format(p.Margin ?? 0, "0.000")}</td></tr>\n");
            else
                sb.Append("<td colspan=\"5\" class=\"muted\">not reachable on this suite</td></tr>\n");
        }
        sb.Append("</tbody>\n</table>\n</section>\n");
    }

    private static void TradeOffChart(StringBuilder sb, AuditReport report, IReadOnlyList<TradeOffPoint> curve)
    {
        const int width = 560, height = 400, left = 56, right = 24, top = 40, bottom = 50;
        var points = curve.Where(p => p.Feasible).OrderBy(p => p.WrongTaskRate).ThenBy(p => p.InScopeAccuracy).ToList();
        double now = report.WrongTaskRate.Value, nowAccuracy = report.InScopeAccuracy.Value;
        double maxWrong = Math.Max(0.01, Math.Max(double.IsNaN(now) ? 0 : now, points.Count == 0 ? 0 : points.Max(p => p.WrongTaskRate)));
        double step = maxWrong <= 0.02 ? 0.005 : maxWrong <= 0.05 ? 0.01 : maxWrong <= 0.1 ? 0.02 : maxWrong <= 0.25 ? 0.05 : 0.1;
        double x1 = Math.Ceiling(maxWrong / step - 1e-9) * step;
        var x = Scale(0, x1, left, width - right);
        var y = Scale(0, 1, height - bottom, top);
        string description = points.Count == 0
            ? "No wrong-task cap is reachable on this suite with false accepts at or below the current rate."
            : "Best in-scope accuracy against wrong-task rate, one point per wrong-task cap: "
              + string.Join("; ", points.Select(p => $"wrong task {Format(p.WrongTaskRate, "0.000")}, accuracy {Format(p.InScopeAccuracy, "0.000")}"))
              + $". The registry now: wrong task {Format(now, "0.000")}, accuracy {Format(nowAccuracy, "0.000")}.";
        OpenSvg(sb, "chart-tradeoff", width, height, "Wrong-task rate against in-scope accuracy", description);
        sb.Append($"<text class=\"chart-title\" x=\"{left}\" y=\"18\">Best accuracy under a wrong-task cap</text>\n");
        AxisY(sb, y, left, width - right, [0, 0.25, 0.5, 0.75, 1], "0.00", "in-scope accuracy", 14, (top + height - bottom) / 2.0);
        AxisX(sb, x, height - bottom, Ticks(0, x1, step), step < 0.01 ? "0.000" : "0.00", "wrong-task rate (in-scope probes accepted as another task)", (left + width - right) / 2.0, height - 12);
        sb.Append($"<line class=\"axis\" x1=\"{left}\" y1=\"{N(y(0))}\" x2=\"{width - right}\" y2=\"{N(y(0))}\"/>\n");
        if (points.Count > 0)
        {
            var path = string.Join(" ", points.Select((p, i) => $"{(i == 0 ? "M" : "L")}{N(x(p.WrongTaskRate))},{N(y(p.InScopeAccuracy))}"));
            sb.Append($"<path class=\"line-solid\" d=\"{path}\" stroke=\"{InScopeColour}\"/>\n");
            foreach (var p in points)
                sb.Append($"<circle class=\"curve-point\" cx=\"{N(x(p.WrongTaskRate))}\" cy=\"{N(y(p.InScopeAccuracy))}\" r=\"4\" fill=\"{InScopeColour}\"><title>cap {Percent(p.MaxWrongTask)}: accuracy {Percent(p.InScopeAccuracy)}, wrong task {Percent(p.WrongTaskRate)}, accept {Format(p.Accept ?? 0, "0.000")}, margin {Format(p.Margin ?? 0, "0.000")}</title></circle>\n");
        }
        else
        {
            sb.Append($"<text class=\"empty-note\" x=\"{N((left + width - right) / 2.0)}\" y=\"{N(y(0.5))}\" text-anchor=\"middle\">no cap reachable on this suite</text>\n");
        }
        if (!double.IsNaN(now) && !double.IsNaN(nowAccuracy))
        {
            double cx = x(Math.Min(now, x1)), cy = y(nowAccuracy);
            sb.Append($"<rect class=\"operating-point\" x=\"{N(cx - 5)}\" y=\"{N(cy - 5)}\" width=\"10\" height=\"10\" fill=\"{WrongTaskColour}\"><title>registry now: accuracy {Percent(nowAccuracy)}, wrong task {Percent(now)}</title></rect>");
            bool labelLeft = cx > width / 2.0;
            sb.Append($"<text class=\"point-label\" x=\"{N(cx + (labelLeft ? -9 : 9))}\" y=\"{N(cy + 18)}\" text-anchor=\"{(labelLeft ? "end" : "start")}\">registry now</text>\n");
        }
        sb.Append("</svg>\n");
    }
}
