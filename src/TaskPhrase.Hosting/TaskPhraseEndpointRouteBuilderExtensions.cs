using System.Diagnostics;
using System.Text.Encodings.Web;
using System.Text.Json;
using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using TaskPhrase.Resolution;

namespace TaskPhrase.Hosting;

/// <summary>Maps the TaskPhrase HTTP/JSON endpoints into any ASP.NET Core application.</summary>
public static class TaskPhraseEndpointRouteBuilderExtensions
{
    /// <summary>
    /// Maps <c>POST /v1/resolve</c>, <c>GET /v1/health</c> and <c>GET /v1/registry</c> (see the package README for the
    /// bodies). Needs <see cref="TaskPhraseServiceCollectionExtensions.AddTaskPhrase(IServiceCollection, Action{TaskPhraseOptions})"/>;
    /// limits come from <see cref="TaskPhraseServerOptions"/> when registered as options, else its defaults.
    /// </summary>
    /// <returns>The <c>/v1</c> route group, for further conventions (authorisation, rate limiting).</returns>
    public static RouteGroupBuilder MapTaskPhrase(this IEndpointRouteBuilder endpoints)
    {
        ArgumentNullException.ThrowIfNull(endpoints);
        var options = endpoints.ServiceProvider.GetService<IOptions<TaskPhraseServerOptions>>()?.Value ?? new TaskPhraseServerOptions();
        var logger = endpoints.ServiceProvider.GetRequiredService<ILoggerFactory>().CreateLogger("TaskPhrase.Hosting.Service");
        long started = Stopwatch.GetTimestamp();
        var group = endpoints.MapGroup("/v1");
        group.MapPost("/resolve", (RequestDelegate)(context => ResolveAsync(context, options, logger)));
        group.MapGet("/health", (RequestDelegate)(context =>
        {
            var reloader = context.RequestServices.GetRequiredService<RegistryReloader>();
            return WriteJsonAsync(context, 200, w => ServiceJson.WriteHealth(w, reloader, Stopwatch.GetElapsedTime(started)));
        }));
        group.MapGet("/registry", (RequestDelegate)(context =>
        {
            var reloader = context.RequestServices.GetRequiredService<RegistryReloader>();
            return WriteJsonAsync(context, 200, w => ServiceJson.WriteRegistry(w, reloader));
        }));
        return group;
    }

    private static async Task ResolveAsync(HttpContext context, TaskPhraseServerOptions options, ILogger logger)
    {
        using var timeout = CancellationTokenSource.CreateLinkedTokenSource(context.RequestAborted);
        timeout.CancelAfter(options.RequestTimeout);
        IReadOnlyList<string> utterances = [];
        try
        {
            ResolveRequestReader.CheckContentType(context.Request);
            byte[] body;
            try
            {
                body = await ResolveRequestReader.ReadBodyAsync(context.Request, options.MaxBodyBytes, timeout.Token).ConfigureAwait(false);
            }
            catch (OperationCanceledException) when (!context.RequestAborted.IsCancellationRequested)
            {
                throw new ServiceError(408, "body_timeout", $"The request body did not arrive within {options.RequestTimeout.TotalSeconds:0.###} s.");
            }
            utterances = ResolveRequestReader.Parse(body, options.MaxBatchSize, out bool batch);
            var resolver = context.RequestServices.GetRequiredService<TaskResolver>();
            long start = Stopwatch.GetTimestamp();
            IReadOnlyList<Resolution.Resolution> results;
            try
            {
                results = await resolver.ResolveManyAsync(utterances, timeout.Token).ConfigureAwait(false);
            }
            catch (OperationCanceledException) when (!context.RequestAborted.IsCancellationRequested)
            {
                logger.RequestTimedOut(utterances.Count, options.RequestTimeout.TotalMilliseconds);
                throw new ServiceError(503, "timeout",
                    $"Resolving took longer than the request timeout ({options.RequestTimeout.TotalSeconds:0.###} s); the service is busy. Retry, or send smaller batches.");
            }
            LogResults(logger, results, Stopwatch.GetElapsedTime(start));
            await WriteJsonAsync(context, 200, w =>
            {
                if (batch) ServiceJson.WriteBatch(w, results);
                else ResolutionJson.Write(w, results[0]);
            }).ConfigureAwait(false);
        }
        catch (ServiceError e)
        {
            logger.RequestRefused(e.Status, e.Code, e.Message);
            await WriteErrorAsync(context, e.Status, e.Code, e.Message).ConfigureAwait(false);
        }
        catch (OperationCanceledException) when (context.RequestAborted.IsCancellationRequested)
        {
            // The client went away: nobody to answer.
        }
        catch (Exception e) when (e is not OperationCanceledException)
        {
            // The exception is not logged whole: its message could quote input.
            logger.ResolveFailed(e.GetType().Name);
            if (!context.Response.HasStarted)
                await WriteErrorAsync(context, 500, "internal_error", "The service failed to resolve the request; see the service log.").ConfigureAwait(false);
        }
    }

    private static void LogResults(ILogger logger, IReadOnlyList<Resolution.Resolution> results, TimeSpan elapsed)
    {
        if (logger.IsEnabled(LogLevel.Debug))
        {
            int accepted = results.Count(r => r.Outcome == ResolutionOutcome.Accepted);
            int ambiguous = results.Count(r => r.Outcome == ResolutionOutcome.Ambiguous);
            logger.Resolved(results.Count, elapsed.TotalMilliseconds, accepted, results.Count - accepted - ambiguous, ambiguous);
        }
        if (logger.IsEnabled(LogLevel.Trace))
        {
            foreach (var r in results)
                logger.UtteranceResolved(r.Utterance, ResolutionJson.Name(r.Outcome), r.Task?.Id, ResolutionJson.Name(r.Reason));
        }
    }

    /// <summary>Writes a JSON error body (<c>{"status", "error", "message"}</c>).</summary>
    internal static Task WriteErrorAsync(HttpContext context, int status, string code, string message)
        => WriteJsonAsync(context, status, w => ServiceJson.WriteError(w, status, code, message));

    // Readable UTF-8 and quotes (the body is application/json, never embedded in HTML).
    private static readonly JsonWriterOptions WriterOptions = new() { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping };

    private static async Task WriteJsonAsync(HttpContext context, int status, Action<Utf8JsonWriter> write)
    {
        var response = context.Response;
        response.StatusCode = status;
        response.ContentType = "application/json; charset=utf-8";
        response.Headers.CacheControl = "no-store";
        using (var writer = new Utf8JsonWriter(response.BodyWriter, WriterOptions)) write(writer);
        await response.BodyWriter.FlushAsync(context.RequestAborted).ConfigureAwait(false);
    }
}
