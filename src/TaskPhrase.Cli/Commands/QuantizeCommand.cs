using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Cli.Commands;

/// <summary><c>taskphrase quantize</c>: writes an int8 variant of a model directory, with quality gates.</summary>
internal static class QuantizeCommand
{
    public static Command Create(CliContext context)
    {
        var model = new Option<string?>("--model")
        {
            Description = "fp32 model directory (model.onnx, vocab.txt, model.json) or built-in id; default: the bundled all-MiniLM-L6-v2.",
        };
        var output = new Option<string>("--output") { Description = "Directory to write the int8 model to (model.onnx, vocab.txt, model.json).", Required = true };
        var alpha = new Option<double>("--alpha") { Description = "SmoothQuant migration strength, 0 to 1.", DefaultValueFactory = _ => 0.7 };
        alpha.Validators.Add(result =>
        {
            // Read the token, not the value: an unparsable token has its own parse error, and asking for its value throws.
            if (result.Tokens is [{ } token] && double.TryParse(token.Value, NumberStyles.Float, CultureInfo.InvariantCulture, out double v)
                && !(v >= 0 && v <= 1)) result.AddError($"--alpha must be between 0 and 1 (e.g. 0.7), not {v.ToString(CultureInfo.InvariantCulture)}.");
        });
        var clinc = new Option<string?>("--clinc150")
        {
            Description = "CLINC150 clinc150_train_val.json (or its folder): also gate on its validation audit (int8 within 1 point of fp32 at fp32's tuned thresholds) and record the figures in the card.",
        };
        var json = CommonOptions.Json();
        var command = new Command("quantize", "Write an int8 variant of a model directory; refuses to write one that drifts from the fp32 model.")
        {
            model, output, alpha, clinc, json,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            string source = parse.GetValue(model) ?? BuiltInModels.MiniLmL6V2;
            string target = parse.GetValue(output)!;
            var result = ModelQuantizer.Quantize(source, target, new QuantizationOptions { Alpha = parse.GetValue(alpha), Clinc150Path = parse.GetValue(clinc) });
            var q = result.Quantization;
            var quality = q.Quality!;
            if (parse.GetValue(json))
            {
                using var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context));
                writer.WriteStartObject();
                writer.WriteBoolean("passed", result.Passed);
                writer.WriteString("output", result.OutputDirectory);
                writer.WriteString("model", result.Card.Id);
                writer.WriteString("model_sha256", result.Card.ModelSha256);
                writer.WriteString("source_model", q.SourceModelId);
                writer.WriteString("source_model_sha256", q.SourceModelSha256);
                writer.WriteString("method", q.Method);
                writer.WriteNumber("alpha", q.Alpha);
                writer.WriteNumber("calibration_phrases", q.CalibrationPhrases);
                writer.WriteString("calibration_set_sha256", q.CalibrationSetSha256);
                writer.WriteNumber("quantized_matmuls", q.QuantizedMatMuls);
                writer.WriteNumber("min_cosine", quality.MinCosine);
                writer.WriteNumber("mean_cosine", quality.MeanCosine);
                writer.WriteNumber("held_out_phrases", quality.HeldOutPhrases);
                writer.WriteStartArray("similarity_matrix");
                foreach (var v in quality.SimilarityMatrix!) writer.WriteNumberValue(v);
                writer.WriteEndArray();
                writer.WriteStartArray("source_similarity_matrix");
                foreach (var v in quality.SourceSimilarityMatrix!) writer.WriteNumberValue(v);
                writer.WriteEndArray();
                if (quality.Clinc150 is { } c)
                {
                    writer.WritePropertyName("clinc150");
                    JsonSerializer.Serialize(writer, c);
                }
                if (result.Failure is null) writer.WriteNull("failure");
                else writer.WriteString("failure", result.Failure);
                writer.WriteEndObject();
                writer.Flush();
                CliRunner.EndJson(context);
            }
            else
            {
                var m = quality.SimilarityMatrix!;
                context.Out.WriteLine(string.Create(CultureInfo.InvariantCulture,
                    $"{q.SourceModelId} -> {result.Card.Id}: {q.QuantizedMatMuls} MatMuls int8, alpha {q.Alpha}; held-out cosine to fp32 min {quality.MinCosine:0.0000} mean {quality.MeanCosine:0.0000} ({quality.HeldOutPhrases} phrases); Quickstart {m[0]:0.0000} / {m[1]:0.0000} / {m[2]:0.0000}"));
                if (quality.Clinc150 is { Fp32: { } f, Int8: { } i8 } c)
                    context.Out.WriteLine(string.Create(CultureInfo.InvariantCulture,
                        $"CLINC150 validation audit at accept {c.Accept:0.000}, margin {c.Margin:0.000} ({c.InScope} in-scope, {c.OutOfScope} out-of-scope): accuracy fp32 {f.InScopeAccuracy:P2} int8 {i8.InScopeAccuracy:P2}; wrong task fp32 {f.WrongTask:P2} int8 {i8.WrongTask:P2}; false accept fp32 {f.FalseAccept:P2} int8 {i8.FalseAccept:P2}"));
                if (result.Passed) context.Out.WriteLine($"wrote {result.OutputDirectory}");
            }
            if (!result.Passed)
            {
                context.Err.WriteLine($"error: quality gate failed, nothing written: {result.Failure}. Try another --alpha (0.6 to 0.8), or keep the fp32 model.");
                return ExitCodes.CheckFailed;
            }
            return ExitCodes.Success;
        }));
        return command;
    }
}
