using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using TaskPhrase.Onnx;

namespace TaskPhrase.Cli.Commands;

/// <summary>
/// <c>taskphrase pool-layers</c>: writes a variant of a model directory whose embedding pools several encoder layers
/// side by side (<see cref="LayerPooledModel"/>), checked against the source before it is written.
/// </summary>
internal static class PoolLayersCommand
{
    public static Command Create(CliContext context)
    {
        var model = CommonOptions.Model();
        var output = new Option<string>("--output") { Description = "Directory to write the new model to (model.onnx, vocab.txt, model.json).", Required = true };
        var layers = new Option<string?>("--layers")
        {
            Description = "Encoder layers to place side by side, 1-based, ascending, comma-separated (e.g. 4,6); default: the layer at two thirds of the depth and the last.",
        };
        layers.Validators.Add(result =>
        {
            if (result.Tokens is [{ } token] && Parse(token.Value) is null)
                result.AddError($"--layers takes layer numbers separated by commas, e.g. 4,6; '{token.Value}' is not that.");
        });
        var json = CommonOptions.Json();
        var command = new Command("pool-layers",
            "Write a variant of a model whose embedding pools several encoder layers side by side (wider vectors, the same forward pass); for the learned task head with few phrases per task. When the last layer is chosen, checks that its part still equals the source embedding.")
        {
            model, output, layers, json,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            string source = parse.GetValue(model) ?? BuiltInModels.MiniLmL6V2;
            var chosen = parse.GetValue(layers) is { } text ? Parse(text) : null;
            var result = LayerPooledModel.Write(source, parse.GetValue(output)!, chosen);
            var card = result.Card;
            var info = card.Layers!;
            if (parse.GetValue(json))
            {
                using var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context));
                writer.WriteStartObject();
                writer.WriteString("output", result.OutputDirectory);
                writer.WriteString("model", card.Id);
                writer.WriteString("model_sha256", card.ModelSha256);
                writer.WriteString("source_model", info.SourceModelId);
                writer.WriteString("source_model_sha256", info.SourceModelSha256);
                writer.WriteStartArray("layers");
                foreach (int l in info.Layers) writer.WriteNumberValue(l);
                writer.WriteEndArray();
                writer.WriteNumber("source_layers", info.SourceLayers);
                writer.WriteNumber("dimensions", card.Dimensions);
                if (info.LastLayerMinCosine is { } c) writer.WriteNumber("last_layer_min_cosine", c);
                else writer.WriteNull("last_layer_min_cosine");
                writer.WriteEndObject();
                writer.Flush();
                CliRunner.EndJson(context);
            }
            else
            {
                string check = info.LastLayerMinCosine is { } c
                    ? string.Create(CultureInfo.InvariantCulture, $"; last layer's part to the source embedding min cosine {c:0.000000}")
                    : "";
                context.Out.WriteLine($"{info.SourceModelId} -> {card.Id}: layers {string.Join(", ", info.Layers)} of {info.SourceLayers}, {card.Dimensions} dimensions{check}");
                context.Out.WriteLine($"wrote {result.OutputDirectory}");
            }
            return ExitCodes.Success;
        }));
        return command;
    }

    /// <summary>The layer numbers of "4,6", or null when the text is not a comma-separated list of integers.</summary>
    private static int[]? Parse(string text)
    {
        var parts = text.Split(',', StringSplitOptions.TrimEntries);
        var values = new int[parts.Length];
        for (int i = 0; i < parts.Length; i++)
            if (!int.TryParse(parts[i], NumberStyles.None, CultureInfo.InvariantCulture, out values[i])) return null;
        return values;
    }
}
