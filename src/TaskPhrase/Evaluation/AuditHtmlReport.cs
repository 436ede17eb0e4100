using System.Globalization;
using System.Reflection;
using System.Text;
using TaskPhrase.Resolution;
using static TaskPhrase.Evaluation.HtmlText;

namespace TaskPhrase.Evaluation;

/// <summary>
/// Writes an <see cref="AuditReport"/> as one self-contained HTML file for safety reviewers: inline CSS and SVG charts,
/// no scripts, no external assets or fonts (a Content-Security-Policy forbids loading any). Every utterance is
/// HTML-escaped and isolated with <c>&lt;bdi&gt;</c>; invisible characters are shown as <c>U+XXXX</c>.
/// </summary>
/// <remarks>
/// Sections: header (suite, registry hash, model id and hash, date, thresholds, budget verdict), findings, summary
/// table of metrics with counts, 95 % intervals and budget marks, score histograms with the accept threshold, ROC curve,
/// threshold sweep, per-task precision/recall, results by kind and by reason, confusion table, worst cases, and all
/// failures. Output is deterministic and culture-invariant. Thread-safe.
/// </remarks>
public static partial class AuditHtmlReport
{
    /// <summary>Most failures listed in the "all failures" table.</summary>
    public const int MaxFailuresListed = 2000;

    /// <summary>Writes the report page to <paramref name="writer"/> (not flushed or closed).</summary>
    /// <param name="report">The report.</param>
    /// <param name="writer">The destination.</param>
    /// <param name="budget">When given, the header shows the verdict and the summary table marks each budget pass or fail.</param>
    /// <param name="tradeOff">
    /// When given (for example <see cref="TuningResult.TradeOff"/> of a tuning of the same suite), a section charts the best
    /// in-scope accuracy against the wrong-task rate for each cap, with the registry's current operating point.
    /// </param>
    public static void Write(AuditReport report, TextWriter writer, AuditBudget? budget = null, IReadOnlyList<TradeOffPoint>? tradeOff = null)
    {
        ArgumentNullException.ThrowIfNull(report);
        ArgumentNullException.ThrowIfNull(writer);
        writer.Write(ToHtml(report, budget, tradeOff));
    }

    /// <summary>The report page as a string (see <see cref="Write"/>).</summary>
    /// <param name="report">The report.</param>
    /// <param name="budget">Optional budget to check and show.</param>
    /// <param name="tradeOff">Optional wrong-task trade-off curve to chart (see <see cref="Write"/>).</param>
    public static string ToHtml(AuditReport report, AuditBudget? budget = null, IReadOnlyList<TradeOffPoint>? tradeOff = null)
    {
        ArgumentNullException.ThrowIfNull(report);
        // All formatting below is explicit, but interpolated integers still consult the current culture; pin it.
        var previous = CultureInfo.CurrentCulture;
        CultureInfo.CurrentCulture = CultureInfo.InvariantCulture;
        try
        {
            return Build(report, budget, tradeOff);
        }
        finally
        {
            CultureInfo.CurrentCulture = previous;
        }
    }

    private static string Build(AuditReport report, AuditBudget? budget, IReadOnlyList<TradeOffPoint>? tradeOff)
    {
        var ctx = report.Context;
        var violations = budget is null ? [] : report.CheckBudgets(budget);
        var sb = new StringBuilder(64 * 1024);
        sb.Append("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
        sb.Append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n");
        sb.Append("<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'; img-src data:\">\n");
        sb.Append("<meta name=\"generator\" content=\"TaskPhrase ").Append(Escape(Version())).Append("\">\n");
        sb.Append("<title>TaskPhrase audit: ").Append(Escape(ctx.SuiteName)).Append("</title>\n");
        sb.Append("<style>\n").Append(Css).Append("</style>\n</head>\n<body>\n");

        Header(sb, report, budget, violations);
        sb.Append("<nav aria-label=\"Sections\"><a href=\"#summary\">Summary</a><a href=\"#scores\">Scores</a><a href=\"#roc\">ROC and sweep</a>")
          .Append(tradeOff is { Count: > 0 } ? "<a href=\"#tradeoff\">Trade-off</a>" : "")
          .Append("<a href=\"#tasks\">Tasks</a><a href=\"#kinds\">Kinds and reasons</a><a href=\"#confusion\">Confusion</a><a href=\"#worst\">Worst cases</a><a href=\"#failures\">All failures</a></nav>\n");
        sb.Append("<main>\n");
        Findings(sb, report, violations);
        Summary(sb, report, budget, violations);

        sb.Append("<section id=\"scores\">\n<h2>Score distributions</h2>\n");
        sb.Append("<p class=\"lead\">Where the in-scope and out-of-scope probes score relative to the accept threshold. Out-of-scope probes to the right of the line get past the threshold and must be stopped by a later guard (margin, look-alike, negation, hazard).</p>\n<figure>");
        ScoreHistogram(sb, report);
        sb.Append("</figure>\n</section>\n");

        sb.Append("<section id=\"roc\">\n<h2>Separation and threshold</h2>\n<div class=\"two\">\n<figure>");
        RocChart(sb, report);
        sb.Append("<figcaption>ROC of the best-match score alone (in-scope probes positive). The dot is the rule “score ≥ accept”; the resolver’s other guards are not part of this curve.</figcaption></figure>\n<figure>");
        SweepChart(sb, report, budget);
        sb.Append("<figcaption>Approximation: a probe counts as accepted at t when it was accepted with score ≥ t, or rejected only as out_of_scope with score ≥ t (as its best task). Later guards are not re-run and per-task thresholds are ignored.</figcaption></figure>\n</div>\n</section>\n");

        if (tradeOff is { Count: > 0 }) TradeOffSection(sb, report, tradeOff);
        Tasks(sb, report);
        KindsAndReasons(sb, report);
        Confusion(sb, report);
        Worst(sb, report);
        Failures(sb, report);
        sb.Append("</main>\n");
        Footer(sb);
        sb.Append("</body>\n</html>\n");
        return sb.ToString();
    }

    private static string Version()
        => typeof(AuditHtmlReport).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion
           ?? typeof(AuditHtmlReport).Assembly.GetName().Version?.ToString() ?? "unknown";

    private static void Header(StringBuilder sb, AuditReport report, AuditBudget? budget, IReadOnlyList<BudgetViolation> violations)
    {
        var ctx = report.Context;
        sb.Append("<header>\n<p class=\"kicker\">TaskPhrase audit report</p>\n<h1>").Append(Escape(ctx.SuiteName)).Append("</h1>\n");
        if (budget is not null && !budget.IsEmpty)
        {
            bool pass = violations.Count == 0;
            sb.Append($"<p class=\"verdict {(pass ? "pass" : "fail")}\" role=\"status\"><span class=\"mark-icon\" aria-hidden=\"true\">{(pass ? "✓" : "✗")}</span> ")
              .Append(pass ? "All budgets met" : $"{violations.Count} budget{(violations.Count == 1 ? "" : "s")} not met")
              .Append(budget.UseConfidenceBound ? " (judged on the conservative end of each 95 % interval)" : " (judged on point values)")
              .Append("</p>\n");
        }
        sb.Append("<dl class=\"meta\">\n");
        Meta(sb, "Suite", Escape(ctx.SuitePath ?? ctx.SuiteName));
        Meta(sb, "Probes", $"{Int(report.Counts.Probes)} ({Int(report.Counts.InScope)} in-scope, {Int(report.Counts.OutOfScope)} out-of-scope)");
        Meta(sb, "Registry", $"<code class=\"hash\">{Escape(ctx.RegistryHash)}</code>");
        Meta(sb, "Model", $"{Escape(ctx.ModelId)}" + (ctx.ModelHash is null ? "" : $" <code class=\"hash\">{Escape(ctx.ModelHash)}</code>"));
        Meta(sb, "Date", Escape(ctx.Date.ToString("yyyy-MM-dd HH:mm:ss 'UTC'zzz", CultureInfo.InvariantCulture)));
        string overrides = ctx.TaskAcceptThresholds.Count == 0 ? "" :
            "; per task: " + string.Join(", ", ctx.TaskAcceptThresholds.OrderBy(p => p.Key, StringComparer.Ordinal).Select(p => $"{Escape(p.Key)} {Format(p.Value, "0.00##")}"));
        Meta(sb, "Thresholds", $"accept {Format(ctx.AcceptThreshold, "0.00##")}, margin {Format(ctx.Margin, "0.00##")}{overrides}");
        sb.Append("</dl>\n</header>\n");
    }

    private static void Meta(StringBuilder sb, string term, string html)
        => sb.Append("<div><dt>").Append(term).Append("</dt><dd>").Append(html).Append("</dd></div>\n");

    private static void Findings(StringBuilder sb, AuditReport report, IReadOnlyList<BudgetViolation> violations)
    {
        var items = new List<(string Css, string Html)>();
        foreach (var v in violations) items.Add(("bad", "Budget not met: " + Escape(v.Message)));
        if (report.WorstFalseAccepts.Count > 0)
        {
            var w = report.WorstFalseAccepts[0];
            items.Add(("bad", $"{Int(report.FalseAcceptRate.Count)} out-of-scope probe{S(report.FalseAcceptRate.Count)} accepted as a task; highest score: {Utterance(w.Utterance)} → <b>{Escape(w.Got)}</b> at {Score(w.Score)} (line {Int(w.Line)})."));
        }
        if (report.WorstWrongTask.Count > 0)
        {
            var w = report.WorstWrongTask[0];
            items.Add(("bad", $"{Int(report.WrongTaskRate.Count)} in-scope probe{S(report.WrongTaskRate.Count)} accepted as the wrong task; highest score: {Utterance(w.Utterance)} → <b>{Escape(w.Got)}</b> instead of {Escape(w.Expected)} at {Score(w.Score)} (line {Int(w.Line)})."));
        }
        var noProbes = report.PerTask.Where(t => t.Support == 0).Select(t => t.TaskId).ToArray();
        if (noProbes.Length > 0)
            items.Add(("warn", $"{noProbes.Length} task{S(noProbes.Length)} without in-scope probes (recall unknown): {Escape(string.Join(", ", noProbes))}."));
        if (report.Counts.OutOfScope == 0)
            items.Add(("warn", "The suite has no out-of-scope probes, so false accepts cannot be measured. Add probes that expect reject."));
        else if (report.FalseAcceptRate.CiHigh - report.FalseAcceptRate.CiLow > 0.1)
            items.Add(("warn", $"The 95 % interval of the false-accept rate is wide ({Percent(report.FalseAcceptRate.CiLow)} to {Percent(report.FalseAcceptRate.CiHigh)}) with {Int(report.Counts.OutOfScope)} out-of-scope probes; add more to narrow it."));
        if (report.Counts.Truncated > 0)
            items.Add(("warn", $"{Int(report.Counts.Truncated)} probe{S(report.Counts.Truncated)} were longer than the model's input limit and were truncated."));
        if (items.Count == 0) items.Add(("good", "No out-of-scope probe was accepted and no in-scope probe was accepted as the wrong task."));

        sb.Append("<section id=\"findings\" aria-labelledby=\"findings-h\">\n<h2 id=\"findings-h\">Findings</h2>\n<ul class=\"findings\">\n");
        foreach (var (css, html) in items) sb.Append($"<li class=\"{css}\">{html}</li>\n");
        sb.Append("</ul>\n</section>\n");
    }

    private static string S(int n) => n == 1 ? "" : "s";

    private static void Summary(StringBuilder sb, AuditReport report, AuditBudget? budget, IReadOnlyList<BudgetViolation> violations)
    {
        sb.Append("<section id=\"summary\">\n<h2>Summary</h2>\n<table class=\"metrics\">\n<caption>Audit metrics with counts and 95 % Wilson score intervals</caption>\n");
        sb.Append("<thead><tr><th scope=\"col\">Metric</th><th scope=\"col\">Value</th><th scope=\"col\">Count</th><th scope=\"col\">95 % interval</th><th scope=\"col\" class=\"ci-col\"><span class=\"visually-hidden\">Interval on a 0–100 % scale</span></th><th scope=\"col\">Budget</th></tr></thead>\n<tbody>\n");
        void Row(string key, string name, string help, RateEstimate rate, double? limit, bool isMax)
        {
            sb.Append($"<tr><th scope=\"row\"><span class=\"metric\">{name}</span><code>{key}</code><span class=\"help\">{help}</span></th>");
            sb.Append($"<td class=\"num big\">{Percent(rate.Value)}</td><td class=\"num\">{Int(rate.Count)} / {Int(rate.Total)}</td>");
            sb.Append($"<td class=\"num\">{Percent(rate.CiLow)} – {Percent(rate.CiHigh)}</td>");
            sb.Append($"<td class=\"ci-col\">{IntervalBar(rate)}</td>");
            if (limit is { } l)
            {
                var v = violations.FirstOrDefault(x => x.Metric == key);
                string mark = v is null ? "<span class=\"pass\"><span aria-hidden=\"true\">✓</span> pass</span>" : "<span class=\"fail\"><span aria-hidden=\"true\">✗</span> fail</span>";
                sb.Append($"<td>{(isMax ? "≤" : "≥")} {Percent(l)} {mark}</td>");
            }
            else sb.Append("<td class=\"muted\">–</td>");
            sb.Append("</tr>\n");
        }
        Row("in_scope_accuracy", "In-scope accuracy", "in-scope probes accepted as the expected task", report.InScopeAccuracy, budget?.MinAccuracy, false);
        Row("wrong_task_rate", "Wrong-task rate", "in-scope probes accepted as another task (the dangerous error)", report.WrongTaskRate, budget?.MaxWrongTask, true);
        Row("false_reject_rate", "False-reject rate", "in-scope probes rejected or ambiguous", report.FalseRejectRate, null, true);
        Row("false_accept_rate", "False-accept rate", "out-of-scope probes accepted as any task", report.FalseAcceptRate, budget?.MaxFalseAccept, true);
        Row("oos_recall", "Out-of-scope recall", "out-of-scope probes not accepted (1 − false-accept rate)", report.OosRecall, null, false);
        Row("ambiguity_rate", "Ambiguity rate", "ambiguous outcomes among all probes", report.AmbiguityRate, null, true);
        sb.Append($"<tr><th scope=\"row\"><span class=\"metric\">AUROC</span><code>auroc</code><span class=\"help\">separation of in-scope from out-of-scope by best-match score (0.5 = chance)</span></th><td class=\"num big\">{Format(report.Auroc, "0.000")}</td><td class=\"num\">{Int(report.Counts.InScope)} × {Int(report.Counts.OutOfScope)} pairs</td><td class=\"muted\">–</td><td class=\"ci-col\"></td><td class=\"muted\">–</td></tr>\n");
        sb.Append($"<tr><th scope=\"row\"><span class=\"metric\">FPR at 95 % TPR</span><code>fpr_at_95_tpr</code><span class=\"help\">share of out-of-scope probes above the score threshold that keeps 95 % of in-scope probes</span></th><td class=\"num big\">{Percent(report.FprAt95Tpr)}</td><td class=\"muted\">–</td><td class=\"muted\">–</td><td class=\"ci-col\"></td><td class=\"muted\">–</td></tr>\n");
        sb.Append("</tbody>\n</table>\n");
        var c = report.Counts;
        sb.Append($"<p class=\"counts\">Outcomes: {Int(c.Accepted)} accepted, {Int(c.Rejected)} rejected, {Int(c.Ambiguous)} ambiguous; {Int(c.ExactMatches)} exact match{(c.ExactMatches == 1 ? "" : "es")}; {Int(c.Truncated)} truncated.</p>\n</section>\n");
    }

    private static string IntervalBar(RateEstimate rate)
    {
        if (rate.Total == 0) return "<span class=\"ci-bar empty\" aria-hidden=\"true\"></span>";
        return $"<span class=\"ci-bar\" aria-hidden=\"true\"><span class=\"ci-range\" style=\"left:{N(rate.CiLow * 100, 2)}%;width:{N((rate.CiHigh - rate.CiLow) * 100, 2)}%\"></span><span class=\"ci-point\" style=\"left:{N(rate.Value * 100, 2)}%\"></span></span>";
    }

    private static void Tasks(StringBuilder sb, AuditReport report)
    {
        sb.Append("<section id=\"tasks\">\n<h2>Per task</h2>\n<figure>");
        PerTaskChart(sb, report);
        sb.Append("</figure>\n<table class=\"data\">\n<caption>Precision (accepted as the task and expected it / accepted as the task) and recall (accepted as expected / probes expecting the task)</caption>\n");
        sb.Append("<thead><tr><th scope=\"col\">Task</th><th scope=\"col\">Support</th><th scope=\"col\">Accepted as task</th><th scope=\"col\">Precision</th><th scope=\"col\">95 % interval</th><th scope=\"col\">Recall</th><th scope=\"col\">95 % interval</th></tr></thead>\n<tbody>\n");
        foreach (var t in report.PerTask)
        {
            sb.Append($"<tr><th scope=\"row\"><code>{Escape(t.TaskId)}</code></th><td class=\"num\">{Int(t.Support)}</td><td class=\"num\">{Int(t.Predicted)}</td>");
            sb.Append($"<td class=\"num\">{Percent(t.Precision.Value)}</td><td class=\"num muted\">{RangeText(t.Precision)}</td>");
            sb.Append($"<td class=\"num\">{Percent(t.Recall.Value)}</td><td class=\"num muted\">{RangeText(t.Recall)}</td></tr>\n");
        }
        sb.Append("</tbody>\n</table>\n</section>\n");
    }

    private static string RangeText(RateEstimate r) => r.Total == 0 ? "–" : $"{Percent(r.CiLow)} – {Percent(r.CiHigh)}";

    private static void KindsAndReasons(StringBuilder sb, AuditReport report)
    {
        sb.Append("<section id=\"kinds\">\n<h2>By kind and by reason</h2>\n<table class=\"data\">\n<caption>By probe kind: correct means accepted as expected (in-scope) or not accepted (out-of-scope)</caption>\n");
        sb.Append("<thead><tr><th scope=\"col\">Kind</th><th scope=\"col\">Probes</th><th scope=\"col\">In / out</th><th scope=\"col\">Correct</th><th scope=\"col\">Rate</th><th scope=\"col\">95 % interval</th></tr></thead>\n<tbody>\n");
        foreach (var k in report.ByKind)
        {
            string name = k.Kind is null ? "<span class=\"mark\">(no kind)</span>" : Escape(k.Kind);
            sb.Append($"<tr><th scope=\"row\">{name}</th><td class=\"num\">{Int(k.Probes)}</td><td class=\"num\">{Int(k.InScope)} / {Int(k.OutOfScope)}</td><td class=\"num\">{Int(k.Correct)}</td>");
            sb.Append($"<td class=\"num\">{Percent(k.Rate.Value)}</td><td class=\"ci-cell\">{IntervalBar(k.Rate)}<span class=\"muted\">{RangeText(k.Rate)}</span></td></tr>\n");
        }
        sb.Append("</tbody>\n</table>\n<table class=\"data\">\n<caption>By reason: out-of-scope probes each guard caught, and in-scope probes it refused</caption>\n");
        sb.Append("<thead><tr><th scope=\"col\">Reason</th><th scope=\"col\">Out-of-scope caught</th><th scope=\"col\">In-scope refused</th><th scope=\"col\">Total</th></tr></thead>\n<tbody>\n");
        foreach (var r in report.ByReason)
            sb.Append($"<tr><th scope=\"row\"><code>{AuditLabels.Reason(r.Reason)}</code></th><td class=\"num\">{Int(r.OutOfScopeCaught)}</td><td class=\"num\">{Int(r.InScopeRefused)}</td><td class=\"num\">{Int(r.Total)}</td></tr>\n");
        sb.Append("</tbody>\n</table>\n</section>\n");
    }

    private static void Confusion(StringBuilder sb, AuditReport report)
    {
        var t = report.Confusion;
        var rowTotals = t.ExpectedLabels.ToDictionary(e => e, e => t.ActualLabels.Sum(a => t.Count(e, a)));
        var rows = t.ExpectedLabels.Where(e => rowTotals[e] > 0).ToList();
        var columns = t.ActualLabels.Where(a => rows.Contains(a) || rows.Sum(e => t.Count(e, a)) > 0
            || a is ConfusionTable.Rejected or ConfusionTable.Ambiguous).ToList();
        sb.Append("<section id=\"confusion\">\n<h2>Confusion table</h2>\n");
        sb.Append("<p class=\"lead\">Rows: what the probe expects. Columns: what came out. Green cells are correct; red cells are accepted as the wrong task or out-of-scope probes accepted; amber cells are in-scope probes refused. Tasks without probes are left out.</p>\n");
        sb.Append("<div class=\"scroll\"><table class=\"confusion\">\n<caption>Probes by expected label and result</caption>\n<thead><tr><th scope=\"col\">expected ↓ / got →</th>");
        foreach (var a in columns) sb.Append($"<th scope=\"col\"><code>{Escape(a)}</code></th>");
        sb.Append("<th scope=\"col\">total</th></tr></thead>\n<tbody>\n");
        foreach (var e in rows)
        {
            sb.Append($"<tr><th scope=\"row\"><code>{Escape(e)}</code></th>");
            foreach (var a in columns)
            {
                int n = t.Count(e, a);
                bool correct = a == e || (e == ProbeCase.Reject && a is ConfusionTable.Rejected or ConfusionTable.Ambiguous);
                string css = n == 0 ? "zero" : correct ? "ok" : a is ConfusionTable.Rejected or ConfusionTable.Ambiguous ? "refused" : "danger";
                double share = rowTotals[e] == 0 ? 0 : (double)n / rowTotals[e];
                string style = n == 0 ? "" : $" style=\"--share:{N(share, 3)}\"";
                sb.Append($"<td class=\"num {css}\"{style}>{(n == 0 ? "·" : Int(n))}</td>");
            }
            sb.Append($"<td class=\"num total\">{Int(rowTotals[e])}</td></tr>\n");
        }
        sb.Append("</tbody>\n</table></div>\n</section>\n");
    }

    private static void Worst(StringBuilder sb, AuditReport report)
    {
        sb.Append("<section id=\"worst\">\n<h2>Worst cases</h2>\n");
        CaseTable(sb, "False accepts: out-of-scope probes accepted, highest score first", report.WorstFalseAccepts, "No out-of-scope probe was accepted.");
        CaseTable(sb, "Wrong task: in-scope probes accepted as another task, highest score first", report.WorstWrongTask, "No in-scope probe was accepted as the wrong task.");
        CaseTable(sb, "False rejects: in-scope probes rejected or ambiguous, lowest score first", report.WorstFalseRejects, "Every in-scope probe was accepted.");
        sb.Append("</section>\n");
    }

    private static void Failures(StringBuilder sb, AuditReport report)
    {
        var failures = report.Cases.Where(c => c.Expected == ProbeCase.Reject
            ? c.Outcome == ResolutionOutcome.Accepted
            : c.Outcome != ResolutionOutcome.Accepted || c.Got != c.Expected).ToList();
        sb.Append("<section id=\"failures\">\n<h2>All failures</h2>\n<details>\n<summary>")
          .Append($"{Int(failures.Count)} of {Int(report.Cases.Count)} probes did not come out as expected")
          .Append(failures.Count > MaxFailuresListed ? $" (first {MaxFailuresListed} listed)" : "").Append("</summary>\n");
        CaseTable(sb, "Failures in suite order", failures.Take(MaxFailuresListed).ToList(), "None.");
        sb.Append("</details>\n</section>\n");
    }

    private static void CaseTable(StringBuilder sb, string caption, IReadOnlyList<AuditCase> cases, string none)
    {
        if (cases.Count == 0)
        {
            sb.Append($"<p class=\"none\"><b>{Escape(caption.Split(':')[0])}:</b> {Escape(none)}</p>\n");
            return;
        }
        sb.Append($"<div class=\"scroll\"><table class=\"data cases\">\n<caption>{Escape(caption)}</caption>\n");
        sb.Append("<thead><tr><th scope=\"col\">Line</th><th scope=\"col\">Utterance</th><th scope=\"col\">Expected</th><th scope=\"col\">Got</th><th scope=\"col\">Nearest</th><th scope=\"col\">Score</th><th scope=\"col\">Reason</th><th scope=\"col\">Kind</th></tr></thead>\n<tbody>\n");
        foreach (var c in cases)
        {
            sb.Append($"<tr><td class=\"num\">{Int(c.Line)}</td><td>{Utterance(c.Utterance)}</td><td><code>{Escape(c.Expected)}</code></td><td><code>{Escape(c.Got)}</code></td>");
            sb.Append($"<td><code>{Escape(c.Nearest ?? "–")}</code></td><td class=\"num\">{Score(c.Score)}</td>");
            sb.Append($"<td>{(c.Reason == RejectionReason.None ? "–" : $"<code>{AuditLabels.Reason(c.Reason)}</code>")}</td><td>{Escape(c.Kind ?? "")}</td></tr>\n");
        }
        sb.Append("</tbody>\n</table></div>\n");
    }

    private static void Footer(StringBuilder sb)
    {
        sb.Append("<footer>\n<h2>Definitions</h2>\n<dl class=\"defs\">\n");
        sb.Append("<dt>In-scope / out-of-scope probe</dt><dd>A probe whose <code>expect</code> is a task id / is <code>reject</code>.</dd>\n");
        sb.Append("<dt>Score</dt><dd>The best-match score of the resolution (cosine similarity of the nearest approved phrase; 1 for an exact match). A resolution without a score (empty or unintelligible input) counts as −1.</dd>\n");
        sb.Append("<dt>95 % interval</dt><dd>Wilson score interval without continuity correction (Newcombe 1998, method 3), z = 1.959964. With few probes the interval is wide: a rate of 0 % out of 20 probes is still compatible with a true rate of up to 16 %.</dd>\n");
        sb.Append("<dt>AUROC, FPR at 95 % TPR</dt><dd>Computed from the best-match score alone, in-scope probes as positives; ties count one half. They describe how well the score separates the two groups, not the full decision procedure.</dd>\n");
        sb.Append("</dl>\n<p class=\"caution\">TaskPhrase is a component, not a certified safety function. Keep a hardware emergency stop and speed and force limits; confirm hazardous tasks; re-audit thresholds for every new user population.</p>\n");
        sb.Append("<p class=\"muted\">Generated by TaskPhrase ").Append(Escape(Version())).Append(".</p>\n</footer>\n");
    }
}
