using System.CommandLine;
using System.Text.Json;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Cli.Commands;

/// <summary><c>taskphrase probes</c>: generates an adversarial probe suite (CSV with a <c>kind</c> column) from a registry, deterministically for a seed.</summary>
internal static class ProbesCommand
{
    public static Command Create(CliContext context)
    {
        var registry = CommonOptions.Registry();
        registry.Required = true;
        var output = new Option<string>("--output", "-o") { Description = "Where to write the probe suite CSV (- for standard output).", Required = true };
        var seed = new Option<ulong>("--seed") { Description = "Seed of the generator (same seed, same suite).", DefaultValueFactory = _ => 1 };
        var count = new Option<int>("--count") { Description = "Number of rows (spread over the kinds).", DefaultValueFactory = _ => 300 };
        count.Validators.Add(r =>
        {
            if (r.GetValueOrDefault<int>() is < 1 or > 100_000) r.AddError("--count must be between 1 and 100000.");
        });
        var kinds = new Option<string[]>("--kind") { Description = $"Only these kinds (repeatable): {string.Join(", ", ProbeKinds.All)}.", AllowMultipleArgumentsPerToken = true };
        var json = CommonOptions.Json();
        var command = new Command("probes", "Generate an adversarial probe suite: typos, speech slips, negations, hazard and target swaps, nonsense, out-of-domain requests.")
        {
            registry, output, seed, count, kinds, json,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            var loaded = ResolverFactory.LoadRegistry(parse.GetValue(registry)!);
            var options = new ProbeGeneratorOptions { Seed = parse.GetValue(seed), Count = parse.GetValue(count) };
            if (parse.GetValue(kinds) is { Length: > 0 } chosen) options = new ProbeGeneratorOptions { Seed = options.Seed, Count = options.Count, Kinds = chosen };
            var rows = ProbeGenerator.Generate(loaded, options);
            string path = parse.GetValue(output)!;
            if (path == "-") ProbeSuite.Write(context.Out, rows);
            else
            {
                using var writer = new StreamWriter(path);
                ProbeSuite.Write(writer, rows);
            }
            var byKind = rows.GroupBy(r => r.Kind ?? "").OrderBy(g => g.Key, StringComparer.Ordinal).ToList();
            // What the suite can show when tune or audit read budgets by their upper 95 % bounds (--conservative).
            int inScope = rows.Count(r => r.IsInScope), outOfScope = rows.Count - inScope;
            double faFloor = TuningBudgets.SmallestShowableBudget(outOfScope), wrongFloor = TuningBudgets.SmallestShowableBudget(inScope);
            if (parse.GetValue(json) && path != "-")
            {
                using var w = new Utf8JsonWriter(CliRunner.StdoutStream(context));
                w.WriteStartObject();
                w.WriteString("output", path);
                w.WriteNumber("rows", rows.Count);
                w.WriteNumber("seed", options.Seed);
                w.WriteNumber("in_scope", inScope);
                w.WriteNumber("out_of_scope", outOfScope);
                w.WriteNumber("smallest_conservative_false_accept_budget", Math.Round(faFloor, 6));
                w.WriteNumber("smallest_conservative_wrong_task_budget", Math.Round(wrongFloor, 6));
                w.WriteStartObject("kinds");
                foreach (var g in byKind) w.WriteNumber(g.Key, g.Count());
                w.WriteEndObject();
                w.WriteEndObject();
                w.Flush();
                CliRunner.EndJson(context);
            }
            else if (path != "-")
            {
                context.Out.WriteLine($"wrote {rows.Count} probes to {path} (seed {options.Seed}): {string.Join(", ", byKind.Select(g => $"{g.Key} {g.Count()}"))}");
                context.Out.WriteLine(string.Create(System.Globalization.CultureInfo.InvariantCulture,
                    $"{inScope} in scope, {outOfScope} out of scope: read by their upper 95 % bounds (--conservative), the smallest budgets this suite can show are {100 * faFloor:0.0} % false accepts and {100 * wrongFloor:0.0} % wrong task, and only with no such error at all."));
            }
            return ExitCodes.Success;
        }));
        return command;
    }
}
