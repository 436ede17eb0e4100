using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using TaskPhrase.Onnx;

namespace TaskPhrase.Cli.Commands;

/// <summary>
/// <c>taskphrase prepare</c>: writes the pre-optimised ONNX Runtime form of a model directory (<c>model.ort</c>) so
/// later start-ups skip the graph optimisation; the embeddings stay the same bit for bit (checked before writing).
/// </summary>
internal static class PrepareCommand
{
    public static Command Create(CliContext context)
    {
        var model = CommonOptions.Model();
        var json = CommonOptions.Json();
        var command = new Command("prepare",
            "Write the pre-optimised ONNX Runtime form of a model directory (model.ort) for a shorter start-up; refuses one whose embeddings differ in any bit.")
        {
            model, json,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            string source = parse.GetValue(model) ?? BuiltInModels.MiniLmL6V2;
            var report = OnnxEmbedder.PrepareOptimizedModel(source);
            if (parse.GetValue(json))
            {
                using var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context));
                writer.WriteStartObject();
                writer.WriteString("path", report.Path);
                writer.WriteNumber("bytes", report.Bytes);
                writer.WriteNumber("compared_phrases", report.ComparedPhrases);
                writer.WriteBoolean("identical", true);
                writer.WriteString("onnx_runtime", report.Runtime);
                writer.WriteString("cpu", report.Cpu);
                writer.WriteEndObject();
                writer.Flush();
                CliRunner.EndJson(context);
            }
            else
            {
                context.Out.WriteLine(string.Create(CultureInfo.InvariantCulture,
                    $"wrote {report.Path} ({report.Bytes / 1048576.0:0.0} MiB); embeddings identical to model.onnx's bit for bit on {report.ComparedPhrases} phrases, one at a time and batched"));
                context.Out.WriteLine($"valid for ONNX Runtime {report.Runtime} on a CPU with {report.Cpu}; elsewhere model.onnx is used");
            }
            return ExitCodes.Success;
        }));
        return command;
    }
}
