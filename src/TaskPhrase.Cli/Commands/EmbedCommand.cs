using System.CommandLine;
using System.Globalization;
using System.Text.Json;

namespace TaskPhrase.Cli.Commands;

/// <summary><c>taskphrase embed</c>: prints the embedding of each text (for debugging and cross-checks).</summary>
internal static class EmbedCommand
{
    public static Command Create(CliContext context)
    {
        var texts = new Argument<string[]>("text") { Description = "Texts to embed.", Arity = ArgumentArity.ZeroOrMore };
        var input = CommonOptions.Input();
        var json = CommonOptions.Json();
        var model = CommonOptions.Model();
        var command = new Command("embed", "Print the embedding vector of each text.") { texts, input, json, model };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            var all = (parse.GetValue(texts) ?? []).ToList();
            if (parse.GetValue(input) is { } path) all.AddRange(InputLines.Read(path, context).Select(l => l.Text));
            if (all.Count == 0) throw new CliException("embed: give texts as arguments or --input FILE (- for standard input).");
            using var lease = context.Model(parse.GetValue(model));
            var embedder = lease.Embedder;
            var (vectors, truncated) = embedder.EmbedMany(all);
            for (int i = 0; i < all.Count; i++)
                if (truncated[i]) context.Err.WriteLine($"warning: text {i + 1} is longer than {embedder.Model.MaxTokens} tokens and was truncated.");
            if (parse.GetValue(json))
            {
                using var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context));
                writer.WriteStartObject();
                writer.WriteString("model", embedder.Model.Id);
                writer.WriteString("model_sha256", embedder.Model.Sha256);
                writer.WriteNumber("dimensions", embedder.Model.Dimensions);
                writer.WriteStartArray("vectors");
                foreach (var v in vectors)
                {
                    writer.WriteStartArray();
                    foreach (var x in v) writer.WriteNumberValue(x);
                    writer.WriteEndArray();
                }
                writer.WriteEndArray();
                writer.WriteStartArray("truncated");
                foreach (var t in truncated) writer.WriteBooleanValue(t);
                writer.WriteEndArray();
                writer.WriteEndObject();
                writer.Flush();
                CliRunner.EndJson(context);
            }
            else
            {
                for (int i = 0; i < all.Count; i++)
                    context.Out.WriteLine($"{ResolveCommand.Printable(all[i])}\t{string.Join(' ', vectors[i].Select(x => x.ToString("0.######", CultureInfo.InvariantCulture)))}");
            }
            return ExitCodes.Success;
        }));
        return command;
    }
}
