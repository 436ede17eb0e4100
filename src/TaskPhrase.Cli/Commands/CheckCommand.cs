using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;
using Spectre.Console;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Cli.Commands;

/// <summary><c>taskphrase check</c>: validates and lints a registry. Exit 1 when it has errors.</summary>
internal static class CheckCommand
{
    public static Command Create(CliContext context)
    {
        var registry = CommonOptions.Registry();
        registry.Required = true;
        var json = CommonOptions.Json();
        var model = CommonOptions.Model();
        var noLint = new Option<bool>("--no-lint") { Description = "Validate only; skip the lint checks that need the model." };
        var command = new Command("check", "Validate a registry (errors with file, line and column) and lint it for task authors.") { registry, json, model, noLint };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            string path = parse.GetValue(registry)!;
            if (Directory.Exists(path)) throw new CliException($"{path}: this is a directory, not a registry file; give the path of the .yaml file.");
            if (!File.Exists(path)) throw new CliException($"{path}: registry file not found.");
            var result = RegistryLoader.TryLoad(path);
            var lint = new List<LintWarning>();
            if (result.Registry is { } loaded)
            {
                lint.AddRange(HazardLint.Check(loaded));
                if (!parse.GetValue(noLint))
                {
                    using var lease = context.Model(parse.GetValue(model));
                    lint.AddRange(RegistryLinter.LintAsync(loaded, lease.Embedder).GetAwaiter().GetResult());
                }
            }
            var errors = result.Errors.ToList();
            var card = LoadCard(parse.GetValue(model));
            string checkedWith = card?.Id ?? BuiltInModels.MiniLmL6V2;
            if (result.Registry?.ModelId is { Length: > 0 } tuned && !string.Equals(tuned, checkedWith, StringComparison.OrdinalIgnoreCase))
                lint.Insert(0, new LintWarning(LintCodes.TunedForAnotherModel, "", null, null, null, null,
                    $"the registry's thresholds were tuned for the model '{tuned}' (its 'model' key), not for '{checkedWith}'; tune it with this model ('taskphrase tune --model …') before using them together."));
            if (parse.GetValue(json)) WriteJson(context, path, result, lint, card);
            else WriteHuman(context, path, result, lint, card);
            return errors.Count > 0 ? ExitCodes.CheckFailed : ExitCodes.Success;
        }));
        return command;
    }

    /// <summary>
    /// The card of the <c>--model</c> directory (or built-in id), or null without <c>--model</c>. Loading checks an int8
    /// card's quality gates (a failing card is a bad-input error, as when the model is loaded).
    /// </summary>
    private static ModelCard? LoadCard(string? model)
    {
        if (model is null) return null;
        string dir = !Directory.Exists(model) && BuiltInModels.Ids.Contains(model) ? BuiltInModels.Locate(model) : model;
        if (!Directory.Exists(dir)) throw new CliException($"Model directory '{dir}' does not exist. Pass a folder with model.onnx, vocab.txt and model.json, or a built-in id ({string.Join(", ", BuiltInModels.Ids)}).");
        return ModelCard.Load(Path.Combine(dir, "model.json"));
    }

    /// <summary>One line on the model: for int8 models the recorded gate figures against the fixed gates (a card that fails them does not load).</summary>
    internal static string DescribeModel(ModelCard card)
    {
        if (card.Layers is { } l)
            return string.Create(CultureInfo.InvariantCulture,
                $"model {card.Id}: fp32, layers {string.Join(", ", l.Layers)} of {l.SourceLayers} of {l.SourceModelId} (SHA-256 {l.SourceModelSha256}) side by side, {card.Dimensions} dimensions{(l.LastLayerMinCosine is { } lc ? $"; last layer's part to the source embedding min cosine {lc:0.000000}" : "")}; the built-in accept and margin were chosen for the source model: tune the registry with this one");
        if (card.Quantization is not { } q) return $"model {card.Id}: fp32";
        var quality = q.Quality!;
        var m = quality.SimilarityMatrix!;
        var s = quality.SourceSimilarityMatrix!;
        string clinc = quality.Clinc150 is { Fp32: { } f, Int8: { } i } c
            ? string.Create(CultureInfo.InvariantCulture,
                $", CLINC150 validation audit at accept {c.Accept:0.000} margin {c.Margin:0.000} int8 / fp32: accuracy {i.InScopeAccuracy:P2} / {f.InScopeAccuracy:P2}, wrong task {i.WrongTask:P2} / {f.WrongTask:P2}, false accept {i.FalseAccept:P2} / {f.FalseAccept:P2} (±{QuantizationGates.Clinc150Points * 100} point)")
            : ", CLINC150 not measured";
        return string.Create(CultureInfo.InvariantCulture,
            $"model {card.Id}: int8 ({q.Method}, alpha {q.Alpha}) of {q.SourceModelId} (SHA-256 {q.SourceModelSha256}); gates: held-out min cosine to fp32 {quality.MinCosine:0.0000} (≥ {QuantizationGates.MinCosine}; single {quality.SingleMinCosine:0.0000}, batched {quality.BatchedMinCosine:0.0000}; {quality.HeldOutPhrases} phrases), Quickstart {m[0]:0.0000} / {m[1]:0.0000} / {m[2]:0.0000} against fp32 {s[0]:0.0000} / {s[1]:0.0000} / {s[2]:0.0000} (±{QuantizationGates.MatrixTolerance}){clinc}: pass");
    }

    private static void WriteHuman(CliContext context, string path, RegistryLoadResult result, IReadOnlyList<LintWarning> lint, ModelCard? card)
    {
        if (card is not null) context.Out.WriteLine(DescribeModel(card));
        foreach (var d in result.Diagnostics) context.Out.WriteLine(d.ToString());
        foreach (var w in lint) context.Out.WriteLine($"{path}: {w}");
        var console = context.Console();
        int errors = result.Errors.Count();
        if (result.Registry is { } r)
            console.MarkupLine($"[green]{Markup.Escape(path)}: {r.Tasks.Count} tasks, {r.Tasks.Sum(t => t.Phrases.Count)} phrases, {r.Tasks.Sum(t => t.MustReject.Count)} look-alikes; hash {r.ContentHash}[/]");
        console.MarkupLine(errors > 0
            ? $"[red]{errors} error(s)[/], {result.Warnings.Count() + lint.Count} warning(s)"
            : $"no errors, {result.Warnings.Count() + lint.Count} warning(s)");
    }

    private static void WriteJson(CliContext context, string path, RegistryLoadResult result, IReadOnlyList<LintWarning> lint, ModelCard? card)
    {
        using var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context), new JsonWriterOptions { Indented = true });
        writer.WriteStartObject();
        writer.WriteString("registry_file", path);
        if (card is not null)
        {
            // The card as written (with its quantization section and gate figures); a card failing the gates does not load.
            writer.WritePropertyName("model");
            writer.WriteRawValue(JsonSerializer.SerializeToUtf8Bytes(card, CardJson));
            writer.WriteString("model_gates", card.IsQuantized ? "pass" : "not quantised");
        }
        writer.WriteBoolean("valid", result.Succeeded);
        if (result.Registry is { } r)
        {
            writer.WriteString("registry", r.ContentHash);
            writer.WriteNumber("tasks", r.Tasks.Count);
            writer.WriteNumber("phrases", r.Tasks.Sum(t => t.Phrases.Count));
        }
        writer.WriteStartArray("errors");
        foreach (var d in result.Diagnostics) WriteDiagnostic(writer, d);
        writer.WriteEndArray();
        writer.WriteStartArray("warnings");
        foreach (var w in lint)
        {
            writer.WriteStartObject();
            writer.WriteString("code", w.Code);
            writer.WriteString("task", w.TaskId);
            writer.WriteString("phrase", w.Phrase);
            writer.WriteString("other_task", w.OtherTaskId);
            writer.WriteString("other_phrase", w.OtherPhrase);
            if (w.Similarity is { } s) writer.WriteNumber("similarity", Math.Round(s, 4)); else writer.WriteNull("similarity");
            writer.WriteString("message", w.Message);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();
        writer.WriteEndObject();
        writer.Flush();
        CliRunner.EndJson(context);
    }

    private static void WriteDiagnostic(Utf8JsonWriter writer, RegistryDiagnostic d)
    {
        writer.WriteStartObject();
        writer.WriteString("severity", d.Severity == DiagnosticSeverity.Error ? "error" : "warning");
        writer.WriteString("code", d.Code);
        writer.WriteString("message", d.Message);
        writer.WriteString("file", d.Source);
        writer.WriteNumber("line", d.Line);
        writer.WriteNumber("column", d.Column);
        writer.WriteEndObject();
    }

    private static readonly JsonSerializerOptions CardJson = new()
    {
        DefaultIgnoreCondition = System.Text.Json.Serialization.JsonIgnoreCondition.WhenWritingNull,
    };
}
