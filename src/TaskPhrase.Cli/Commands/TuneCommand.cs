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
/// writes a copy of the registry with the values and how they were obtained. With budgets, the scoring strategy and
/// its parameters are searched jointly with the thresholds (<see cref="ScoringSearch"/>; <c>--strategies</c> restricts
/// it). No feasible setting → exit 1, with the best it could do.
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
        var strategies = new Option<string?>("--strategies")
        {
            Description = "Budget mode: scoring strategies to search, comma-separated (" + string.Join(", ", ScoringCandidate.StrategyNames) + "); default all.",
        };
        var conservative = new Option<bool>("--conservative")
        {
            Description = "Budget mode: judge each rate by the upper end of its 95 % Wilson interval, so the budgets hold only where the suite is large enough to show it.",
        };
        var json = CommonOptions.Json();
        var model = CommonOptions.Model();
        var command = new Command("tune", "Choose thresholds from a probe suite under false-accept / wrong-task budgets or a coverage target.")
        {
            registry, probes, output, maxFalseAccept, maxWrongTask, coverage, strategies, conservative, json, model,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            double? far = parse.GetValue(maxFalseAccept), wrong = parse.GetValue(maxWrongTask), cover = parse.GetValue(coverage);
            if (cover is not null && (far is not null || wrong is not null))
                throw new CliException("tune: give either --coverage R or budgets (--max-false-accept R [--max-wrong-task R]), not both.");
            if (cover is null && far is null)
                throw new CliException("tune: give --max-false-accept R (optionally with --max-wrong-task R), or --coverage R.");
            string? strategyList = parse.GetValue(strategies);
            if (cover is not null && strategyList is not null)
                throw new CliException("tune: --strategies applies to budget tuning (--max-false-accept); coverage tuning keeps the registry's scoring.");
            bool bound = parse.GetValue(conservative);
            if (cover is not null && bound)
                throw new CliException("tune: --conservative reads the budgets of budget tuning by their confidence bounds; drop --conservative, or tune with --max-false-accept R [--max-wrong-task R] instead of --coverage.");
            IReadOnlyList<ScoringCandidate>? candidates = null;
            if (cover is null)
            {
                try
                {
                    candidates = ScoringCandidate.DefaultGrid(strategyList?.Split(','));
                }
                catch (ArgumentException e)
                {
                    throw new CliException("tune: --strategies: " + e.Message.Split(" (Parameter")[0]);
                }
            }
            string registryPath = parse.GetValue(registry)!, probesPath = parse.GetValue(probes)!;
            var loaded = ResolverFactory.LoadRegistry(registryPath);
            using var lease = context.BatchModel(parse.GetValue(model));
            var suite = ProbeRunner.LoadSuite(probesPath, loaded);
            TuningResult result;
            ScoringSearchResult? search = null;
            if (cover is { } r)
            {
                var resolver = TaskPhrase.Resolution.TaskResolver.Create(loaded, lease.Embedder);
                var resolutions = ProbeRunner.ResolveAll(context, resolver, suite.Cases);
                var scored = suite.Cases.Select((c, i) => ScoredProbe.From(c, resolutions[i])).ToList();
                result = new ThresholdTuner().TuneForCoverage(scored, r, loaded.Defaults.Margin);
            }
            else
            {
                search = ScoringSearch.Run(loaded, lease.Embedder, suite.Cases, new TuningBudgets(far!.Value, wrong) { UseConfidenceBound = bound }, candidates!,
                    progress: p => ReportProgress(context, p));
                result = search.Result;
            }
            // The tuned copy names the model its thresholds were tuned with (its 'model' key).
            result = result with { ModelId = lease.Embedder.Model.Id };
            string suiteHash = Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(probesPath)));
            string comment = TunedRegistryWriter.BuildProvenanceComment(result, Path.GetFileName(probesPath), suiteHash, DateTimeOffset.UtcNow, search?.Outcomes);
            string outPath = parse.GetValue(output)!;
            if (result.Feasible)
            {
                using var writer = new StreamWriter(outPath);
                TunedRegistryWriter.WriteFromFile(registryPath, result, comment, writer);
            }
            if (parse.GetValue(json)) WriteJson(context, result, search, outPath);
            else WriteHuman(context, result, search, outPath);
            return result.Feasible ? ExitCodes.Success : ExitCodes.CheckFailed;
        }));
        return command;
    }

    /// <summary>One line per scoring setting on standard error: which one is being scored, then what it reached.</summary>
    private static void ReportProgress(CliContext context, ScoringSearchProgress p)
    {
        if (p.Result is not { } r)
        {
            if (context.Interactive) context.Err.WriteLine($"[{p.Index + 1}/{p.Count}] scoring the suite with {p.Candidate.Label} …");
            return;
        }
        var m = r.Metrics;
        context.Err.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"[{p.Index + 1}/{p.Count}] {p.Candidate.Label}: in-scope accuracy {m.InScopeAccuracy.Value:P1}, wrong task {m.WrongTaskRate.Value:P1}, false accept {m.FalseAcceptRate.Value:P1}{(r.Feasible ? "" : " (budgets not met)")}"));
    }

    private static void WriteHuman(CliContext context, TuningResult result, ScoringSearchResult? search, string outPath)
    {
        var console = context.Console();
        var m = result.Metrics;
        if (result.Scoring is { } scoring)
            console.MarkupLine($"scoring {Markup.Escape(scoring.Label)} (best of {search?.Outcomes.Count ?? 1} settings searched)");
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

    private static void WriteScoring(Utf8JsonWriter writer, string name, ScoringCandidate? scoring)
    {
        if (scoring is null)
        {
            writer.WriteNull(name);
            return;
        }
        writer.WriteStartObject(name);
        writer.WriteString("strategy", scoring.Strategy);
        var p = scoring.Parameters;
        if (p?.Shrinkage is { } s) writer.WriteNumber("shrinkage", s); else writer.WriteNull("shrinkage");
        if (p?.L2 is { } l2) writer.WriteNumber("l2", l2); else writer.WriteNull("l2");
        if (p?.Temperature is { } t) writer.WriteNumber("temperature", t); else writer.WriteNull("temperature");
        if (p?.ProbabilityWeight is { } w) writer.WriteNumber("probability_weight", w); else writer.WriteNull("probability_weight");
        if (p?.K is { } k) writer.WriteNumber("k", k); else writer.WriteNull("k");
        if (p?.CentroidWeight is { } cw) writer.WriteNumber("centroid_weight", cw); else writer.WriteNull("centroid_weight");
        writer.WriteEndObject();
    }

    private static void WriteJson(CliContext context, TuningResult result, ScoringSearchResult? search, string outPath)
    {
        using var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context), new JsonWriterOptions { Indented = true });
        writer.WriteStartObject();
        writer.WriteBoolean("feasible", result.Feasible);
        writer.WriteString("mode", result.Mode.ToString().ToLowerInvariant());
        writer.WriteBoolean("conservative", result.Budgets?.UseConfidenceBound ?? false);
        WriteScoring(writer, "scoring", result.Scoring);
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
        writer.WriteStartArray("searched");
        foreach (var o in search?.Outcomes ?? [])
        {
            writer.WriteStartObject();
            WriteScoring(writer, "scoring", o.Candidate);
            writer.WriteBoolean("feasible", o.Result.Feasible);
            writer.WriteNumber("accept", Math.Round(o.Result.Accept, 6));
            writer.WriteNumber("margin", Math.Round(o.Result.Margin, 6));
            Rate("in_scope_accuracy", o.Result.Metrics.InScopeAccuracy);
            Rate("wrong_task_rate", o.Result.Metrics.WrongTaskRate);
            Rate("false_accept_rate", o.Result.Metrics.FalseAcceptRate);
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
