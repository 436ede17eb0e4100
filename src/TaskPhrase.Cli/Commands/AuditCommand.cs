using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using Spectre.Console;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Cli.Commands;

/// <summary>
/// <c>taskphrase audit</c>: runs a probe suite against a registry or index and reports the audit metrics
/// (terminal table, <c>--json</c>, <c>--html</c>). A missed budget exits 1.
/// </summary>
internal static class AuditCommand
{
    public static Command Create(CliContext context)
    {
        var registry = CommonOptions.Registry();
        var index = CommonOptions.Index();
        var probes = new Option<string>("--probes") { Description = "Probe suite CSV (header utterance,expect[,kind,note]).", Required = true };
        var json = CommonOptions.Json();
        var html = new Option<string?>("--html") { Description = "Also write a self-contained HTML report with charts to FILE." };
        var model = CommonOptions.Model();
        var maxFalseAccept = RateOption("--max-false-accept", "Fail (exit 1) when the false-accept rate is above R (0..1).");
        var maxWrongTask = RateOption("--max-wrong-task", "Fail (exit 1) when the wrong-task rate is above R (0..1).");
        var minAccuracy = RateOption("--min-accuracy", "Fail (exit 1) when in-scope accuracy is below R (0..1).");
        var conservative = new Option<bool>("--conservative")
        {
            Description = "Judge the budgets by the conservative end of each 95 % Wilson interval (upper for the maxima, lower for --min-accuracy), so a small suite cannot pass by luck. The wrong-task trade-off lines stay on point rates.",
        };
        var command = new Command("audit", "Run a probe suite and report accuracy, false accepts and wrong-task rates with 95 % Wilson intervals.")
        {
            registry, index, probes, json, html, model, maxFalseAccept, maxWrongTask, minAccuracy, conservative,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            var budget = new AuditBudget(parse.GetValue(maxFalseAccept), parse.GetValue(maxWrongTask), parse.GetValue(minAccuracy))
            {
                UseConfidenceBound = parse.GetValue(conservative),
            };
            if (budget.UseConfidenceBound && budget.IsEmpty)
                throw new CliException("audit: --conservative judges budgets; give at least one of --max-false-accept, --max-wrong-task or --min-accuracy.");
            using var lease = context.BatchModel(parse.GetValue(model));
            var resolver = ResolverFactory.Create(parse.GetValue(registry), parse.GetValue(index), lease);
            ResolverFactory.WarnIfTunedForAnotherModel(context, resolver);
            string probesPath = parse.GetValue(probes)!;
            var suite = ProbeRunner.LoadSuite(probesPath, resolver.Registry);
            var resolutions = ProbeRunner.ResolveAll(context, resolver, suite.Cases);
            var report = AuditEvaluator.Evaluate(suite.Cases, resolutions, AuditContext.Create(resolver.Registry, resolver.Model, suite, DateTimeOffset.UtcNow));
            var violations = report.CheckBudgets(budget);
            // What a stricter wrong-task budget would cost on this suite (thresholds re-chosen per cap, false accepts kept
            // at the rate the registry's current thresholds give).
            var scored = suite.Cases.Select((c, i) => ScoredProbe.From(c, resolutions[i])).ToList();
            // Needs both kinds of probe; a suite of one kind has no trade-off to show.
            var tradeOff = report.Counts.InScope > 0 && report.Counts.OutOfScope > 0
                ? new ThresholdTuner().TuneForBudgets(scored, new TuningBudgets(report.FalseAcceptRate.Value)).TradeOff
                : [];
            if (parse.GetValue(html) is { } htmlPath)
            {
                using var file = new StreamWriter(htmlPath);
                AuditHtmlReport.Write(report, file, budget, tradeOff);
                context.Err.WriteLine($"wrote {htmlPath}");
            }
            if (parse.GetValue(json))
            {
                var node = System.Text.Json.Nodes.JsonNode.Parse(AuditJson.ToJson(report, budget))!.AsObject();
                var curve = new System.Text.Json.Nodes.JsonArray();
                foreach (var p in tradeOff)
                    curve.Add(new System.Text.Json.Nodes.JsonObject
                    {
                        ["max_wrong_task"] = p.MaxWrongTask,
                        ["feasible"] = p.Feasible,
                        ["in_scope_accuracy"] = double.IsNaN(p.InScopeAccuracy) ? null : p.InScopeAccuracy,
                        ["wrong_task_rate"] = double.IsNaN(p.WrongTaskRate) ? null : p.WrongTaskRate,
                        ["accept"] = p.Accept,
                        ["margin"] = p.Margin,
                    });
                node["wrong_task_trade_off"] = curve;
                context.Out.WriteLine(node.ToJsonString(new JsonSerializerOptions { WriteIndented = true }));
            }
            else
            {
                Summary(context, report);
                var console = context.Console();
                console.MarkupLine("[bold]wrong-task budget → best in-scope accuracy on this suite[/] (thresholds re-chosen, false accepts ≤ current rate)");
                foreach (var p in tradeOff)
                    console.MarkupLine(p.Feasible
                        ? $"  ≤ {p.MaxWrongTask:P1}: {p.InScopeAccuracy:P1} (wrong task {p.WrongTaskRate:P1}, accept {p.Accept:0.000}, margin {p.Margin:0.000})"
                        : $"  ≤ {p.MaxWrongTask:P1}: not reachable");
                foreach (var v in violations) context.Console().MarkupLine($"[red]budget missed:[/] {Markup.Escape(v.Message)}");
            }
            return violations.Count > 0 ? ExitCodes.CheckFailed : ExitCodes.Success;
        }));
        return command;
    }

    internal static Option<double?> RateOption(string name, string description)
    {
        var option = new Option<double?>(name) { Description = description };
        option.Validators.Add(result =>
        {
            // Read the token, not the value: an unparsable token has its own parse error, and asking for its value throws.
            if (result.Tokens is [{ } token] && double.TryParse(token.Value, NumberStyles.Float, CultureInfo.InvariantCulture, out double v)
                && (v < 0 || v > 1 || double.IsNaN(v)))
                result.AddError($"{name} must be a rate between 0 and 1 (e.g. 0.05 for 5 %), not {v.ToString(CultureInfo.InvariantCulture)}.");
        });
        return option;
    }

    private static void Summary(CliContext context, AuditReport report)
    {
        var console = context.Console();
        var c = report.Context;
        console.MarkupLine($"[bold]audit[/] {Markup.Escape(c.SuiteName)} · registry {c.RegistryHash[..12]} · model {Markup.Escape(c.ModelId)} · accept {c.AcceptThreshold:0.00} margin {c.Margin:0.00}");
        var table = new Table().AddColumns("metric", "value", "count", "95 % interval");
        void Row(string name, RateEstimate r) => table.AddRow(name, $"{r.Value:P1}", $"{r.Count}/{r.Total}", $"{r.CiLow:P1} – {r.CiHigh:P1}");
        Row("in_scope_accuracy", report.InScopeAccuracy);
        Row("wrong_task_rate", report.WrongTaskRate);
        Row("false_reject_rate", report.FalseRejectRate);
        Row("false_accept_rate", report.FalseAcceptRate);
        Row("oos_recall", report.OosRecall);
        Row("ambiguity_rate", report.AmbiguityRate);
        table.AddRow("auroc", report.Auroc.ToString("0.000", CultureInfo.InvariantCulture), "", "");
        table.AddRow("fpr_at_95_tpr", report.FprAt95Tpr.ToString("0.000", CultureInfo.InvariantCulture), "", "");
        console.Write(table);
        if (report.ByKind.Count > 0)
        {
            var kinds = new Table().AddColumns("kind", "probes", "correct", "rate");
            foreach (var k in report.ByKind) kinds.AddRow(Markup.Escape(k.Kind ?? "(none)"), k.Probes.ToString(CultureInfo.InvariantCulture), k.Correct.ToString(CultureInfo.InvariantCulture), $"{k.Rate.Value:P1}");
            console.Write(kinds);
        }
        foreach (var w in report.WorstFalseAccepts.Take(5))
            console.MarkupLine($"[red]false accept[/] {Markup.Escape(w.Utterance)} → {Markup.Escape(w.Got)} ({w.Score:0.000})");
        foreach (var w in report.WorstWrongTask.Take(5))
            console.MarkupLine($"[red]wrong task[/] {Markup.Escape(w.Utterance)} → {Markup.Escape(w.Got)}, expected {Markup.Escape(w.Expected)} ({w.Score:0.000})");
    }
}
