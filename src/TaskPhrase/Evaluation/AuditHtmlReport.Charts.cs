using System.Text;
using static TaskPhrase.Evaluation.HtmlText;

namespace TaskPhrase.Evaluation;

// The inline SVG charts. Every chart has role="img", a <title> and a <desc> (via aria-labelledby), axis labels and
// tick labels as text, and colours from the Okabe–Ito palette (distinguishable with common colour-vision deficiencies);
// series are also told apart by line style or position, never by colour alone.
public static partial class AuditHtmlReport
{
    private const string InScopeColour = "#0072B2";   // blue
    private const string OutOfScopeColour = "#D55E00"; // vermillion
    private const string WrongTaskColour = "#CC79A7";  // reddish purple
    private const string RecallColour = "#009E73";     // bluish green

    /// <summary>Opens an accessible SVG element.</summary>
    private static void OpenSvg(StringBuilder sb, string id, int width, int height, string title, string description)
    {
        sb.Append($"<svg id=\"{id}\" class=\"chart\" viewBox=\"0 0 {width} {height}\" width=\"{width}\" height=\"{height}\" role=\"img\" aria-labelledby=\"{id}-title {id}-desc\" xmlns=\"http://www.w3.org/2000/svg\">\n");
        sb.Append($"<title id=\"{id}-title\">{Escape(title)}</title>\n<desc id=\"{id}-desc\">{Escape(description)}</desc>\n");
    }

    /// <summary>Linear map from [d0, d1] to [r0, r1].</summary>
    private static Func<double, double> Scale(double d0, double d1, double r0, double r1)
        => d1 == d0 ? _ => (r0 + r1) / 2 : v => r0 + (v - d0) / (d1 - d0) * (r1 - r0);

    private static void AxisX(StringBuilder sb, Func<double, double> x, double y, IEnumerable<double> ticks, string format, string label, double labelX, double labelY)
    {
        foreach (double t in ticks)
        {
            sb.Append($"<line class=\"tick\" x1=\"{N(x(t))}\" y1=\"{N(y)}\" x2=\"{N(x(t))}\" y2=\"{N(y + 4)}\"/>");
            sb.Append($"<text class=\"tick-label\" x=\"{N(x(t))}\" y=\"{N(y + 16)}\" text-anchor=\"middle\">{Format(t, format)}</text>\n");
        }
        sb.Append($"<text class=\"axis-label\" x=\"{N(labelX)}\" y=\"{N(labelY)}\" text-anchor=\"middle\">{Escape(label)}</text>\n");
    }

    private static void AxisY(StringBuilder sb, Func<double, double> y, double x, double gridTo, IEnumerable<double> ticks, string format, string label, double labelX, double labelY)
    {
        foreach (double t in ticks)
        {
            sb.Append($"<line class=\"grid\" x1=\"{N(x)}\" y1=\"{N(y(t))}\" x2=\"{N(gridTo)}\" y2=\"{N(y(t))}\"/>");
            sb.Append($"<text class=\"tick-label\" x=\"{N(x - 6)}\" y=\"{N(y(t) + 4)}\" text-anchor=\"end\">{Format(t, format)}</text>\n");
        }
        sb.Append($"<text class=\"axis-label\" transform=\"translate({N(labelX)} {N(labelY)}) rotate(-90)\" text-anchor=\"middle\">{Escape(label)}</text>\n");
    }

    private static double[] Ticks(double from, double to, double step)
    {
        var ticks = new List<double>();
        for (double t = Math.Ceiling(from / step - 1e-9) * step; t <= to + 1e-9; t += step) ticks.Add(Math.Round(t, 10) + 0.0); // + 0.0 turns −0 into 0
        return [.. ticks];
    }

    private static int NiceCountStep(int max) => max switch { <= 5 => 1, <= 10 => 2, <= 25 => 5, <= 50 => 10, <= 100 => 20, _ => (int)Math.Pow(10, Math.Floor(Math.Log10(max))) };

    // ---- score histograms ------------------------------------------------------------------------------------

    private const double BinWidth = 0.05;

    private static void ScoreHistogram(StringBuilder sb, AuditReport report)
    {
        var ins = report.InScopeScores.Where(s => s != AuditEvaluator.NoScore).ToArray();
        var outs = report.OutOfScopeScores.Where(s => s != AuditEvaluator.NoScore).ToArray();
        int noScoreIn = report.InScopeScores.Count - ins.Length, noScoreOut = report.OutOfScopeScores.Count - outs.Length;
        double accept = report.Context.AcceptThreshold;
        double lowest = ins.Concat(outs).Append(accept).Min();
        double xMin = Math.Max(-1, Math.Floor(lowest / BinWidth + 1e-9) * BinWidth);
        double xMax = Math.Max(1, Math.Ceiling(ins.Concat(outs).Append(accept).Max() / BinWidth - 1e-9) * BinWidth);
        int bins = Math.Max(1, (int)Math.Round((xMax - xMin) / BinWidth));
        int[] Bin(double[] scores)
        {
            var counts = new int[bins];
            foreach (double s in scores) counts[Math.Clamp((int)Math.Floor((s - xMin) / BinWidth + 1e-9), 0, bins - 1)]++;
            return counts;
        }
        int[] inCounts = Bin(ins), outCounts = Bin(outs);

        const int width = 720, height = 390, left = 56, right = 16, top = 58, panel = 110, gap = 60;
        var x = Scale(xMin, xMax, left, width - right);
        string description = $"Histograms of best-match scores in bins of {Format(BinWidth, "0.00")}: {ins.Length} in-scope probes (top) "
            + $"and {outs.Length} out-of-scope probes (bottom), with the accept threshold {Format(accept, "0.00")} marked by a dashed line. "
            + (noScoreIn + noScoreOut > 0 ? $"{noScoreIn + noScoreOut} probes without a score (empty or unintelligible input) are not drawn." : "");
        OpenSvg(sb, "chart-scores", width, height, "Score distributions of in-scope and out-of-scope probes", description);
        sb.Append($"<text class=\"chart-title\" x=\"{left}\" y=\"18\">Best-match score by probe type</text>\n");

        void Panel(int[] counts, double yTop, string colour, string label, int n, int noScore, string cssClass)
        {
            int max = Math.Max(1, counts.Max());
            int step = NiceCountStep(max);
            int yMaxCount = (int)Math.Ceiling((double)max / step) * step;
            var y = Scale(0, yMaxCount, yTop + panel, yTop);
            AxisY(sb, y, left, width - right, Ticks(0, yMaxCount, step), "0", "probes", 16, yTop + panel / 2.0);
            for (int b = 0; b < bins; b++)
            {
                if (counts[b] == 0) continue;
                double x0 = x(xMin + b * BinWidth) + 1, x1 = x(xMin + (b + 1) * BinWidth) - 1;
                double lo = xMin + b * BinWidth;
                sb.Append($"<rect class=\"{cssClass}\" x=\"{N(x0)}\" y=\"{N(y(counts[b]))}\" width=\"{N(x1 - x0)}\" height=\"{N(y(0) - y(counts[b]))}\" fill=\"{colour}\">")
                  .Append($"<title>{Escape(label)}: {counts[b]} probe{(counts[b] == 1 ? "" : "s")} scoring {Format(lo, "0.00")}–{Format(lo + BinWidth, "0.00")}</title></rect>\n");
            }
            sb.Append($"<line class=\"axis\" x1=\"{left}\" y1=\"{N(y(0))}\" x2=\"{width - right}\" y2=\"{N(y(0))}\"/>\n");
            string extra = noScore > 0 ? $", {noScore} without a score not drawn" : "";
            sb.Append($"<text class=\"panel-label\" x=\"{left}\" y=\"{N(yTop - 10)}\" style=\"fill:{colour}\">{Escape(label)} probes (n = {n}{extra})</text>\n");
        }

        double top1 = top, top2 = top + panel + gap;
        Panel(inCounts, top1, InScopeColour, "in-scope", report.InScopeScores.Count, noScoreIn, "bar-in");
        Panel(outCounts, top2, OutOfScopeColour, "out-of-scope", report.OutOfScopeScores.Count, noScoreOut, "bar-out");
        double ticksStep = xMax - xMin > 1.01 ? 0.2 : 0.1;
        AxisX(sb, x, top1 + panel, Ticks(xMin, xMax, ticksStep), "0.0", "", 0, 0);
        AxisX(sb, x, top2 + panel, Ticks(xMin, xMax, ticksStep), "0.0", "best-match score (cosine similarity)", (left + width - right) / 2.0, top2 + panel + 36);

        double xa = x(accept);
        sb.Append($"<line class=\"threshold\" x1=\"{N(xa)}\" y1=\"{top - 24}\" x2=\"{N(xa)}\" y2=\"{N(top2 + panel)}\"/>\n");
        sb.Append($"<text class=\"threshold-label\" x=\"{N(xa + 4)}\" y=\"{top - 26}\">accept ≥ {Format(accept, "0.00")}</text>\n");
        sb.Append("</svg>\n");
    }

    // ---- ROC curve -------------------------------------------------------------------------------------------

    private static void RocChart(StringBuilder sb, AuditReport report)
    {
        const int size = 400, left = 56, right = 20, top = 34, bottom = 50;
        var x = Scale(0, 1, left, size - right);
        var y = Scale(0, 1, size - bottom, top);
        string auroc = Format(report.Auroc, "0.000");
        string description = report.Roc.Count == 0
            ? "No ROC curve: the suite needs both in-scope and out-of-scope probes."
            : $"ROC curve of the best-match score, in-scope probes as positives: AUROC {auroc}, false-positive rate at 95 % true-positive rate {Format(report.FprAt95Tpr, "0.000")}. The diagonal shows chance.";
        OpenSvg(sb, "chart-roc", size, size, $"ROC curve (AUROC {auroc})", description);
        sb.Append($"<text class=\"chart-title\" x=\"{left}\" y=\"18\">ROC curve, AUROC {auroc}</text>\n");
        double[] ticks = [0, 0.25, 0.5, 0.75, 1];
        AxisY(sb, y, left, size - right, ticks, "0.00", "true-positive rate (in-scope scored ≥ t)", 14, (top + size - bottom) / 2.0);
        AxisX(sb, x, size - bottom, ticks, "0.00", "false-positive rate (out-of-scope scored ≥ t)", (left + size - right) / 2.0, size - 12);
        sb.Append($"<line class=\"axis\" x1=\"{left}\" y1=\"{N(y(0))}\" x2=\"{size - right}\" y2=\"{N(y(0))}\"/>");
        sb.Append($"<line class=\"chance\" x1=\"{N(x(0))}\" y1=\"{N(y(0))}\" x2=\"{N(x(1))}\" y2=\"{N(y(1))}\"/>\n");
        sb.Append($"<line class=\"guide\" x1=\"{N(x(0))}\" y1=\"{N(y(0.95))}\" x2=\"{N(x(1))}\" y2=\"{N(y(0.95))}\"/>");
        sb.Append($"<text class=\"guide-label\" x=\"{N(x(1) - 4)}\" y=\"{N(y(0.95) + 14)}\" text-anchor=\"end\">TPR 95 %</text>\n");
        if (report.Roc.Count > 0)
        {
            var path = string.Join(" ", report.Roc.Select((p, i) => $"{(i == 0 ? "M" : "L")}{N(x(p.Fpr))},{N(y(p.Tpr))}"));
            sb.Append($"<path class=\"roc\" d=\"{path}\" stroke=\"{InScopeColour}\"/>\n");
            double accept = report.Context.AcceptThreshold;
            double tpr = report.InScopeScores.Count(s => s >= accept) / (double)report.InScopeScores.Count;
            double fpr = report.OutOfScopeScores.Count(s => s >= accept) / (double)report.OutOfScopeScores.Count;
            sb.Append($"<circle class=\"operating-point\" cx=\"{N(x(fpr))}\" cy=\"{N(y(tpr))}\" r=\"5\" fill=\"{OutOfScopeColour}\"><title>score ≥ {Format(accept, "0.00")}: TPR {Format(tpr, "0.000")}, FPR {Format(fpr, "0.000")}</title></circle>");
            bool labelLeft = x(fpr) > size / 2.0;
            sb.Append($"<text class=\"point-label\" x=\"{N(x(fpr) + (labelLeft ? -8 : 8))}\" y=\"{N(y(tpr) + 16)}\" text-anchor=\"{(labelLeft ? "end" : "start")}\">score ≥ {Format(accept, "0.00")}</text>\n");
        }
        else
        {
            sb.Append($"<text class=\"empty-note\" x=\"{N(x(0.5))}\" y=\"{N(y(0.5))}\" text-anchor=\"middle\">needs in-scope and out-of-scope probes</text>\n");
        }
        sb.Append("</svg>\n");
    }

    // ---- threshold sweep -------------------------------------------------------------------------------------

    private static void SweepChart(StringBuilder sb, AuditReport report, AuditBudget? budget)
    {
        const int width = 480, height = 400, left = 56, right = 20, top = 56, bottom = 50;
        var sweep = report.ThresholdSweep;
        double t0 = sweep[0].Threshold, t1 = sweep[^1].Threshold;
        if (t1 - t0 < 1e-9) { t0 -= 0.05; t1 += 0.05; }
        var x = Scale(t0, t1, left, width - right);
        var y = Scale(0, 1, height - bottom, top);
        double accept = report.Context.AcceptThreshold;
        var at = sweep.First(p => Math.Abs(p.Threshold - accept) <= 1e-12);
        string description = $"Approximate in-scope accuracy, wrong-task rate and false-accept rate if the global accept threshold were t, "
            + $"for t from {Format(t0, "0.00")} to {Format(t1, "0.00")}. At the current threshold {Format(accept, "0.00")}: accuracy {Format(at.InScopeAccuracy, "0.000")}, "
            + $"false-accept rate {Format(at.FalseAcceptRate, "0.000")}.";
        OpenSvg(sb, "chart-sweep", width, height, "Threshold sweep: accuracy and false-accept rate", description);
        sb.Append($"<text class=\"chart-title\" x=\"{left}\" y=\"18\">If the accept threshold were t …</text>\n");
        double[] rateTicks = [0, 0.25, 0.5, 0.75, 1];
        AxisY(sb, y, left, width - right, rateTicks, "0.00", "rate", 14, (top + height - bottom) / 2.0);
        double step = (t1 - t0) > 0.6 ? 0.1 : (t1 - t0) > 0.25 ? 0.05 : 0.02;
        AxisX(sb, x, height - bottom, Ticks(t0, t1, step), step < 0.05 ? "0.00" : "0.0#", "accept threshold t (score ≥ t accepted)", (left + width - right) / 2.0, height - 12);
        sb.Append($"<line class=\"axis\" x1=\"{left}\" y1=\"{N(y(0))}\" x2=\"{width - right}\" y2=\"{N(y(0))}\"/>\n");

        // Step lines: a rate holds from one threshold to the next.
        string Steps(Func<SweepPoint, double> rate)
        {
            var parts = new List<string>();
            for (int i = 0; i < sweep.Count; i++)
            {
                double r = rate(sweep[i]);
                if (double.IsNaN(r)) return "";
                parts.Add($"{(i == 0 ? "M" : "L")}{N(x(sweep[i].Threshold))},{N(y(r))}");
                if (i + 1 < sweep.Count) parts.Add($"L{N(x(sweep[i + 1].Threshold))},{N(y(r))}");
            }
            return string.Join(" ", parts);
        }
        if (budget?.MaxFalseAccept is { } maxFa)
        {
            sb.Append($"<line class=\"guide\" x1=\"{left}\" y1=\"{N(y(maxFa))}\" x2=\"{width - right}\" y2=\"{N(y(maxFa))}\" stroke=\"{OutOfScopeColour}\"/>");
            sb.Append($"<text class=\"guide-label\" x=\"{width - right - 4}\" y=\"{N(y(maxFa) - 4)}\" text-anchor=\"end\">false-accept budget {Format(maxFa * 100, "0.##")} %</text>\n");
        }
        (string Label, string Colour, string Css, Func<SweepPoint, double> Rate)[] series =
        [
            ("in-scope accuracy", InScopeColour, "line-solid", p => p.InScopeAccuracy),
            ("false-accept rate", OutOfScopeColour, "line-dashed", p => p.FalseAcceptRate),
            ("wrong-task rate", WrongTaskColour, "line-dotted", p => p.WrongTaskRate),
        ];
        for (int i = 0; i < series.Length; i++)
        {
            var s = series[i];
            string d = Steps(s.Rate);
            if (d.Length > 0) sb.Append($"<path class=\"{s.Css}\" d=\"{d}\" stroke=\"{s.Colour}\"/>\n");
            double lx = left + i * 140;
            sb.Append($"<line class=\"{s.Css}\" x1=\"{N(lx)}\" y1=\"38\" x2=\"{N(lx + 26)}\" y2=\"38\" stroke=\"{s.Colour}\"/>");
            sb.Append($"<text class=\"legend\" x=\"{N(lx + 32)}\" y=\"42\">{s.Label}{(d.Length == 0 ? " (n/a)" : "")}</text>\n");
        }
        double xa = x(accept);
        sb.Append($"<line class=\"threshold\" x1=\"{N(xa)}\" y1=\"{top}\" x2=\"{N(xa)}\" y2=\"{N(y(0))}\"/>");
        sb.Append($"<text class=\"threshold-label\" x=\"{N(xa + 4)}\" y=\"{top + 12}\">current {Format(accept, "0.00")}</text>\n");
        sb.Append("</svg>\n");
    }

    // ---- per-task precision and recall -----------------------------------------------------------------------

    private static void PerTaskChart(StringBuilder sb, AuditReport report)
    {
        var tasks = report.PerTask;
        const int width = 720, left = 150, right = 90, top = 50, row = 34;
        int height = top + Math.Max(1, tasks.Count) * row + 40;
        var x = Scale(0, 1, left, width - right);
        OpenSvg(sb, "chart-tasks", width, height, "Precision and recall per task",
            $"Horizontal bars per task: precision (upper bar) and recall (lower bar) with their 95 % intervals as whiskers; {tasks.Count(t => t.Support == 0)} of {tasks.Count} tasks have no in-scope probes.");
        sb.Append($"<text class=\"chart-title\" x=\"{left}\" y=\"18\">Precision and recall per task</text>\n");
        sb.Append($"<rect x=\"{left}\" y=\"30\" width=\"14\" height=\"8\" fill=\"{InScopeColour}\"/><text class=\"legend\" x=\"{left + 20}\" y=\"38\">precision (upper bar)</text>");
        sb.Append($"<rect x=\"{left + 170}\" y=\"30\" width=\"14\" height=\"8\" fill=\"{RecallColour}\"/><text class=\"legend\" x=\"{left + 190}\" y=\"38\">recall (lower bar)</text>");
        sb.Append($"<text class=\"legend\" x=\"{width - right + 8}\" y=\"38\">support</text>\n");
        double[] ticks = [0, 0.25, 0.5, 0.75, 1];
        double bottomY = top + tasks.Count * row;
        foreach (double t in ticks)
            sb.Append($"<line class=\"grid\" x1=\"{N(x(t))}\" y1=\"{top}\" x2=\"{N(x(t))}\" y2=\"{N(bottomY)}\"/>");
        AxisX(sb, x, bottomY, ticks, "0.00", "rate", (left + width - right) / 2.0, bottomY + 34);
        for (int i = 0; i < tasks.Count; i++)
        {
            var t = tasks[i];
            double y0 = top + i * row;
            sb.Append($"<text class=\"task-label\" x=\"{left - 8}\" y=\"{N(y0 + row / 2.0 + 4)}\" text-anchor=\"end\">{Escape(t.TaskId)}</text>");
            Bar(sb, x, y0 + 5, t.Precision, InScopeColour, $"{t.TaskId} precision");
            Bar(sb, x, y0 + 18, t.Recall, RecallColour, $"{t.TaskId} recall");
            sb.Append($"<text class=\"support\" x=\"{width - right + 8}\" y=\"{N(y0 + row / 2.0 + 4)}\">{(t.Support == 0 ? "no probes" : "n = " + Int(t.Support))}</text>\n");
        }
        sb.Append("</svg>\n");
    }

    private static void Bar(StringBuilder sb, Func<double, double> x, double y, RateEstimate rate, string colour, string label)
    {
        const double h = 11;
        if (rate.Total == 0)
        {
            sb.Append($"<text class=\"na\" x=\"{N(x(0) + 4)}\" y=\"{N(y + 9)}\">n/a</text>");
            return;
        }
        sb.Append($"<rect x=\"{N(x(0))}\" y=\"{N(y)}\" width=\"{N(Math.Max(0.5, x(rate.Value) - x(0)))}\" height=\"{h}\" fill=\"{colour}\">")
          .Append($"<title>{Escape(label)}: {Format(rate.Value * 100, "0.0")} % ({rate.Count}/{rate.Total}), 95 % interval {Format(rate.CiLow * 100, "0.0")}–{Format(rate.CiHigh * 100, "0.0")} %</title></rect>");
        double yc = y + h / 2;
        sb.Append($"<line class=\"whisker\" x1=\"{N(x(rate.CiLow))}\" y1=\"{N(yc)}\" x2=\"{N(x(rate.CiHigh))}\" y2=\"{N(yc)}\"/>");
        sb.Append($"<line class=\"whisker\" x1=\"{N(x(rate.CiLow))}\" y1=\"{N(yc - 3)}\" x2=\"{N(x(rate.CiLow))}\" y2=\"{N(yc + 3)}\"/>");
        sb.Append($"<line class=\"whisker\" x1=\"{N(x(rate.CiHigh))}\" y1=\"{N(yc - 3)}\" x2=\"{N(x(rate.CiHigh))}\" y2=\"{N(yc + 3)}\"/>");
    }
}
