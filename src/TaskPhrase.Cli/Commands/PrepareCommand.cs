using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using TaskPhrase.Onnx;

namespace TaskPhrase.Cli.Commands;

/// <summary>
/// <c>taskphrase prepare</c>: writes the mapped form of a model directory (<c>model.mapped.onnx</c> and
/// <c>model.mapped.data</c>) so later start-ups map the weights instead of copying them; the embeddings stay the same
/// bit for bit (checked before writing).
/// </summary>
internal static class PrepareCommand
{
    public static Command Create(CliContext context)
    {
        var model = CommonOptions.Model();
        var json = CommonOptions.Json();
        var command = new Command("prepare",
            "Write the mapped form of a model directory (model.mapped.onnx + model.mapped.data: weights mapped into memory, not copied) for a shorter start-up and less memory; refuses one whose embeddings differ in any bit.")
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
                writer.WriteString("data_path", report.DataPath);
                writer.WriteNumber("bytes", report.Bytes);
                writer.WriteNumber("external_tensors", report.ExternalTensors);
                writer.WriteNumber("compared_phrases", report.ComparedPhrases);
                writer.WriteBoolean("identical", true);
                writer.WriteEndObject();
                writer.Flush();
                CliRunner.EndJson(context);
            }
            else
            {
                context.Out.WriteLine(string.Create(CultureInfo.InvariantCulture,
                    $"wrote {report.Path} and {Path.GetFileName(report.DataPath)} ({report.Bytes / 1048576.0:0.0} MiB, {report.ExternalTensors} tensors mapped); embeddings identical to model.onnx's bit for bit on {report.ComparedPhrases} phrases, one at a time and batched"));
            }
            return ExitCodes.Success;
        }));
        return command;
    }
}
