using System.CommandLine;
using System.Text.Json;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Logging.Console;
using Microsoft.Extensions.Options;
using TaskPhrase.Hosting;
using TaskPhrase.Registry;

namespace TaskPhrase.Cli.Commands;

/// <summary>
/// <c>taskphrase serve</c>: the loopback HTTP/JSON service for non-.NET robot stacks (POST /v1/resolve, GET /v1/health,
/// GET /v1/registry). Runs until SIGTERM or Ctrl+C, then shuts down gracefully; exit 0.
/// </summary>
internal static class ServeCommand
{
    public static Command Create(CliContext context)
    {
        var registry = CommonOptions.Registry();
        var index = CommonOptions.Index();
        var model = CommonOptions.Model();
        var film = CommonOptions.Film();
        var json = new Option<bool>("--json") { Description = "Print the start line as one JSON object ({\"event\": \"listening\", \"urls\": [...], ...})." };
        var urls = new Option<string>("--urls")
        {
            Description = $"Address(es) to listen on, separated by ';' (port 0 picks a free port). Loopback only unless --allow-remote.",
            DefaultValueFactory = _ => TaskPhraseServerOptions.DefaultUrls,
        };
        var allowRemote = new Option<bool>("--allow-remote")
        {
            Description = "Allow non-loopback addresses. Anyone who can reach the port can then choose the arm's task: only on a trusted, access-controlled network.",
        };
        var maxBody = new Option<int>("--max-body")
        {
            Description = "Largest request body in bytes (256 to 16777216); larger requests get 413.",
            DefaultValueFactory = _ => TaskPhraseServerOptions.DefaultMaxBodyBytes,
        };
        var command = new Command("serve", "Run the loopback HTTP/JSON service: POST /v1/resolve, GET /v1/health, GET /v1/registry.")
        {
            registry, index, urls, allowRemote, model, maxBody, film, json,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            string? registryPath = parse.GetValue(registry), indexPath = parse.GetValue(index);
            if ((registryPath is null) == (indexPath is null))
                throw new CliException("serve: give exactly one of --registry FILE or --index FILE.");
            foreach (var path in new[] { registryPath, indexPath })
                if (path is not null && !File.Exists(path)) throw new CliException($"{path}: file not found.");
            int bodyLimit = parse.GetValue(maxBody);
            if (bodyLimit is < 256 or > 16 * 1024 * 1024)
                throw new CliException($"--max-body {bodyLimit}: give a size between 256 and 16777216 bytes.");
            var serverOptions = new TaskPhraseServerOptions
            {
                Urls = parse.GetValue(urls) ?? TaskPhraseServerOptions.DefaultUrls,
                AllowRemote = parse.GetValue(allowRemote),
                MaxBodyBytes = bodyLimit,
            };
            CheckAddresses(serverOptions);
            bool verbose = parse.GetValue<bool>("--verbose");
            using var lease = context.Model(parse.GetValue(model));
            var server = TaskPhraseServer.Create(serverOptions,
                tp => tp.Configure(o => { o.RegistryPath = registryPath; o.IndexPath = indexPath; }).UseEmbeddingGenerator(lease.Embedder),
                host =>
                {
                    // Logs go to standard error, so standard output carries only the start line.
                    host.Logging.ClearProviders();
                    host.Logging.AddSimpleConsole(o => { o.SingleLine = true; o.TimestampFormat = "HH:mm:ss "; });
                    host.Services.Configure<ConsoleLoggerOptions>(o => o.LogToStandardErrorThreshold = LogLevel.Trace);
                    host.Logging.SetMinimumLevel(verbose ? LogLevel.Debug : LogLevel.Information);
                    host.Logging.AddFilter("Microsoft", LogLevel.Warning);
                });
            try
            {
                if (parse.GetValue(film) is { } filmPath) FilmSupport.Attach(filmPath, server.Registry.Resolver);
                server.StartAsync().GetAwaiter().GetResult();
                PrintStartLine(context, server, parse.GetValue(json));
                server.WaitForShutdownAsync().GetAwaiter().GetResult();
                return ExitCodes.Success;
            }
            catch (OptionsValidationException e)
            {
                throw new CliException(string.Join(" ", e.Failures), ExitCodes.BadInput, e);
            }
            catch (RegistryException e)
            {
                throw new CliException(string.Join(Environment.NewLine + "error: ", e.Diagnostics.Select(d => d.ToString())), ExitCodes.BadInput, e);
            }
            catch (IndexException e)
            {
                throw new CliException(e.Message, ExitCodes.BadInput, e);
            }
            finally
            {
                server.DisposeAsync().AsTask().GetAwaiter().GetResult();
            }
        }));
        return command;
    }

    // Checked before the model loads, so a refused address fails at once.
    private static void CheckAddresses(TaskPhraseServerOptions options)
    {
        try
        {
            options.GetListenAddresses();
        }
        catch (ArgumentException e)
        {
            // A refused --urls: the message says what to do; the parameter name is noise on a command line.
            throw new CliException(e.ParamName is null ? e.Message : e.Message.Replace($" (Parameter '{e.ParamName}')", ""), ExitCodes.BadInput, e);
        }
    }

    private static void PrintStartLine(CliContext context, TaskPhraseServer server, bool asJson)
    {
        var resolver = server.Registry.Resolver;
        var urls = server.Addresses.Select(a => a.ToString().TrimEnd('/')).ToList();
        if (asJson)
        {
            using (var writer = new Utf8JsonWriter(CliRunner.StdoutStream(context)))
            {
                writer.WriteStartObject();
                writer.WriteString("event", "listening");
                writer.WriteStartArray("urls");
                foreach (var url in urls) writer.WriteStringValue(url);
                writer.WriteEndArray();
                writer.WriteString("registry", resolver.Registry.ContentHash);
                if (server.Registry.SourcePath is { } source) writer.WriteString("registry_path", source);
                else writer.WriteNull("registry_path");
                writer.WriteNumber("tasks", resolver.Registry.Tasks.Count);
                writer.WriteString("model", resolver.Model.Id);
                writer.WriteNumber("pid", Environment.ProcessId);
                writer.WriteEndObject();
            }
            CliRunner.EndJson(context);
        }
        else
        {
            context.Out.WriteLine($"taskphrase serve: listening on {string.Join(", ", urls)}; registry {resolver.Registry.ContentHash[..12]} ({resolver.Registry.Tasks.Count} tasks), model {resolver.Model.Id}. SIGTERM or Ctrl+C stops.");
        }
        context.Out.Flush();
    }
}
