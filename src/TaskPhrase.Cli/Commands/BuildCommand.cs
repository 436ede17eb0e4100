using System.CommandLine;
using System.Text.Json;
using TaskPhrase.Resolution;

namespace TaskPhrase.Cli.Commands;

/// <summary><c>taskphrase build</c>: compiles a registry into a checksummed index (phrase embeddings, metadata, optional FiLM table).</summary>
internal static class BuildCommand
{
    public static Command Create(CliContext context)
    {
        var registry = CommonOptions.Registry();
        registry.Required = true;
        var output = new Option<string>("--output", "-o") { Description = "Index file to write.", Required = true };
        var film = CommonOptions.Film();
        var json = CommonOptions.Json();
        var model = CommonOptions.Model();
        var command = new Command("build", "Compile a registry to an index file: embeddings computed once, checked by SHA-256 at load.") { registry, output, film, json, model };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            var loaded = ResolverFactory.LoadRegistry(parse.GetValue(registry)!);
            using var lease = context.BatchModel(parse.GetValue(model));
            var generator = parse.GetValue(film) is { } filmPath ? FilmSupport.Load(filmPath, lease.Embedder.Model.Dimensions) : null;
            string path = parse.GetValue(output)!;
            var started = System.Diagnostics.Stopwatch.StartNew();
            var index = TaskIndexBuilder.BuildAsync(path, loaded, lease.Embedder, generator).GetAwaiter().GetResult();
            double seconds = started.Elapsed.TotalSeconds;
            if (parse.GetValue(json))
            {
                using var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context));
                writer.WriteStartObject();
                writer.WriteString("index", path);
                writer.WriteString("registry", index.RegistryHash);
                writer.WriteString("model", index.Model.Id);
                writer.WriteString("model_sha256", index.Model.Sha256);
                writer.WriteNumber("phrases", index.PhraseCount);
                writer.WriteBoolean("film", generator is not null);
                if (generator is not null) writer.WriteString("film_sha256", generator.Sha256);
                writer.WriteNumber("seconds", Math.Round(seconds, 3));
                writer.WriteEndObject();
                writer.Flush();
                CliRunner.EndJson(context);
            }
            else
            {
                context.Out.WriteLine($"wrote {path}: {index.PhraseCount} phrases of {loaded.Tasks.Count} tasks, registry {index.RegistryHash[..12]}, model {index.Model.Id} ({index.Model.Sha256[..12]}){(generator is null ? "" : $", FiLM table from {generator.Sha256[..12]}")} in {seconds:0.00} s");
            }
            return ExitCodes.Success;
        }));
        return command;
    }
}
