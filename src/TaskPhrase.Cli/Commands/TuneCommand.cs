using System.CommandLine;
using System.Globalization;
using System.Security.Cryptography;
using System.Text.Json;
using Spectre.Console;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Cli.Commands;

/// <summary>
/// <c>taskphrase tune</c>: chooses the accept threshold and margin (and per-task overrides where the data supports
/// them) from a probe suite, under false-accept and wrong-task budgets or a split-conformal coverage target, and
/// writes a copy of the registry with the values and how they were obtained. No feasible setting → exit 1.
/// </summary>
internal static class TuneCommand
{
    public static Command Create(CliContext context)
    {
        var registry = CommonOptions.Registry();
        registry.Required = true;
        var probes = new Option<string>("--probes") { Description = "Tuning probe suite CSV.", Required = true };
        var output = new Option<string>("--output", "-o") { Description = "Where to write the tuned registry YAML.", Required = true };
        var maxFalseAccept = AuditCommand.RateOption("--max-false-accept", "Highest false-accept rate allowed on the suite (0..1).");
        var maxWrongTask = AuditCommand.RateOption("--max-wrong-task", "Highest wrong-task rate allowed on the suite (0..1).");
        var coverage = AuditCommand.RateOption("--coverage", "Instead of budgets: accept at least this share of in-scope probes (split conformal).");
        var json = CommonOptions.Json();
        var model = CommonOptions.Model();
        var command = new Command("tune", "Choose thresholds from a probe suite under false-accept / wrong-task budgets or a coverage target.")
        {
            registry, probes, output, maxFalseAccept, maxWrongTask, coverage, json, model,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            double? far = parse.GetValue(maxFalseAccept), wrong = parse.GetValue(maxWrongTask), cover = parse.GetValue(coverage);
            if (cover is not null && (far is not null || wrong is not null))
                throw new CliException("tune: give either --coverage R or budgets (--max-false-accept R [--max-wrong-task R]), not both.");
            if (cover is null && far is null)
                throw new CliException("tune: give --max-false-accept R (optionally with --max-wrong-task R), or --coverage R.");
            string registryPath = parse.GetValue(registry)!, probesPath = parse.GetValue(probes)!;
            var loaded = ResolverFactory.LoadRegistry(registryPath);
            using var lease = context.Model(parse.GetValue(model));
            var resolver = TaskPhrase.Resolution.TaskResolver.Create(loaded, lease.Embedder);
            var suite = ProbeRunner.LoadSuite(probesPath, loaded);
            var resolutions = ProbeRunner.ResolveAll(context, resolver, suite.Cases);
            var scored = suite.Cases.Select((c, i) => ScoredProbe.From(c, resolutions[i])).ToList();
            var tuner = new ThresholdTuner();
            var result = cover is { } r
                ? tuner.TuneForCoverage(scored, r, loaded.Defaults.Margin)
                : tuner.TuneForBudgets(scored, new TuningBudgets(far!.Value, wrong));
            string suiteHash = Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(probesPath)));
            string comment = TunedRegistryWriter.BuildProvenanceComment(result, Path.GetFileName(probesPath), suiteHash, DateTimeOffset.UtcNow);
            string outPath = parse.GetValue(output)!;
            if (result.Feasible)
            {
                using var writer = new StreamWriter(outPath);
                TunedRegistryWriter.WriteFromFile(registryPath, result, comment, writer);
            }
            if (parse.GetValue(json)) WriteJson(context, result, outPath);
            else WriteHuman(context, result, outPath);
            return result.Feasible ? ExitCodes.Success : ExitCodes.CheckFailed;
        }));
        return command;
    }

    private static void WriteHuman(CliContext context, TuningResult result, string outPath)
    {
        var console = context.Console();
        var m = result.Metrics;
        console.MarkupLine(result.Feasible
            ? $"[green]tuned[/] accept {result.Accept.ToString("0.000", CultureInfo.InvariantCulture)}, margin {result.Margin.ToString("0.000", CultureInfo.InvariantCulture)}{(result.AcceptOverrides.Count > 0 ? $", {result.AcceptOverrides.Count} per-task override(s)" : "")} → {Markup.Escape(outPath)}"
            : "[red]no setting meets the budgets[/]; the best it could do:");
        var table = new Table().AddColumns("on the tuning suite", "value", "count", "95 % interval");
        void Row(string n, RateEstimate r) => table.AddRow(n, $"{r.Value:P1}", $"{r.Count}/{r.Total}", $"{r.CiLow:P1} – {r.CiHigh:P1}");
        Row("in_scope_accuracy", m.InScopeAccuracy);
        Row("wrong_task_rate", m.WrongTaskRate);
        Row("false_reject_rate", m.FalseRejectRate);
        Row("false_accept_rate", m.FalseAcceptRate);
        console.Write(table);
        foreach (var (task, accept) in result.AcceptOverrides) console.MarkupLine($"  override {Markup.Escape(task)}: accept {accept:0.000}");
        foreach (var note in result.Notes) console.MarkupLine($"[grey]{Markup.Escape(note)}[/]");
        console.MarkupLine("[yellow]These figures come from the tuning suite itself: confirm them with 'taskphrase audit' on a separate suite.[/]");
    }

    private static void WriteJson(CliContext context, TuningResult result, string outPath)
    {
        using var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context), new JsonWriterOptions { Indented = true });
        writer.WriteStartObject();
        writer.WriteBoolean("feasible", result.Feasible);
        writer.WriteString("mode", result.Mode.ToString().ToLowerInvariant());
        writer.WriteNumber("accept", Math.Round(result.Accept, 6));
        writer.WriteNumber("margin", Math.Round(result.Margin, 6));
        writer.WriteStartObject("accept_overrides");
        foreach (var (task, accept) in result.AcceptOverrides) writer.WriteNumber(task, Math.Round(accept, 6));
        writer.WriteEndObject();
        void Rate(string name, RateEstimate r)
        {
            writer.WriteStartObject(name);
            writer.WriteNumber("value", double.IsNaN(r.Value) ? 0 : r.Value);
            writer.WriteNumber("count", r.Count);
            writer.WriteNumber("total", r.Total);
            writer.WriteNumber("ci_low", r.CiLow);
            writer.WriteNumber("ci_high", r.CiHigh);
            writer.WriteEndObject();
        }
        Rate("in_scope_accuracy", result.Metrics.InScopeAccuracy);
        Rate("wrong_task_rate", result.Metrics.WrongTaskRate);
        Rate("false_reject_rate", result.Metrics.FalseRejectRate);
        Rate("false_accept_rate", result.Metrics.FalseAcceptRate);
        writer.WriteStartArray("trade_off");
        foreach (var p in result.TradeOff)
        {
            writer.WriteStartObject();
            writer.WriteNumber("max_wrong_task", p.MaxWrongTask);
            writer.WriteBoolean("feasible", p.Feasible);
            writer.WriteNumber("in_scope_accuracy", p.InScopeAccuracy);
            writer.WriteNumber("wrong_task_rate", p.WrongTaskRate);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();
        writer.WriteString("output", result.Feasible ? outPath : null);
        writer.WriteStartArray("notes");
        foreach (var n in result.Notes) writer.WriteStringValue(n);
        writer.WriteEndArray();
        writer.WriteEndObject();
        writer.Flush();
        CliRunner.EndJson(context);
    }
}
