using Microsoft.AspNetCore.Builder;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Hosting.Server;
using Microsoft.AspNetCore.Hosting.Server.Features;
using Microsoft.AspNetCore.Http;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;

namespace TaskPhrase.Hosting;

/// <summary>
/// The TaskPhrase HTTP/JSON service for non-.NET robot stacks: a minimal-API web application bound to
/// <c>http://127.0.0.1:5077</c> unless told otherwise, serving <c>POST /v1/resolve</c>, <c>GET /v1/health</c> and
/// <c>GET /v1/registry</c>. It refuses non-loopback addresses unless <see cref="TaskPhraseServerOptions.AllowRemote"/>
/// is set, reloads the registry file without dropping requests, and shuts down gracefully on SIGTERM or Ctrl+C.
/// </summary>
/// <example>
/// <code>
/// await using var server = TaskPhraseServer.Create(new TaskPhraseServerOptions(),
///     tp => tp.Configure(o => o.RegistryPath = "registry.yaml"));
/// await server.RunAsync();
/// </code>
/// </example>
public sealed class TaskPhraseServer : IAsyncDisposable
{
    private readonly WebApplication _app;
    private readonly TaskPhraseServerOptions _options;

    private TaskPhraseServer(WebApplication app, TaskPhraseServerOptions options)
    {
        _app = app;
        _options = options;
    }

    /// <summary>
    /// Builds the service (nothing listens until <see cref="StartAsync"/>). TaskPhrase options are bound from the
    /// <c>TaskPhrase</c> configuration section (appsettings.json beside the application, environment variables such as
    /// <c>TaskPhrase__RegistryPath</c>) and then from <paramref name="configure"/>.
    /// </summary>
    /// <param name="options">Listen address and limits; null for the defaults. Copied.</param>
    /// <param name="configure">Configures TaskPhrase (registry path, model, generator).</param>
    /// <param name="configureHost">Last-minute changes to the host (logging providers, extra services).</param>
    /// <exception cref="ArgumentException">An address is malformed or not loopback while remote access is not allowed.</exception>
    public static TaskPhraseServer Create(TaskPhraseServerOptions? options = null, Action<TaskPhraseBuilder>? configure = null,
        Action<WebApplicationBuilder>? configureHost = null)
    {
        options = options?.Clone() ?? new TaskPhraseServerOptions();
        var urls = options.GetListenAddresses();
        var builder = WebApplication.CreateSlimBuilder(new WebApplicationOptions { Args = [], ContentRootPath = AppContext.BaseDirectory });
        builder.WebHost.UseUrls([.. urls]);
        builder.WebHost.ConfigureKestrel(kestrel =>
        {
            kestrel.AddServerHeader = false;
            kestrel.Limits.MaxRequestBodySize = options.MaxBodyBytes;
            kestrel.Limits.RequestHeadersTimeout = TimeSpan.FromSeconds(10);
            kestrel.Limits.MaxRequestHeadersTotalSize = 32 * 1024;
        });
        builder.Services.Configure<HostOptions>(host => host.ShutdownTimeout = options.ShutdownTimeout);
        builder.Services.AddSingleton(Options.Create(options));
        var taskPhrase = builder.Services.AddTaskPhrase(builder.Configuration.GetSection(TaskPhraseOptions.SectionName));
        configure?.Invoke(taskPhrase);
        configureHost?.Invoke(builder);

        var app = builder.Build();
        app.UseStatusCodePages(async context =>
        {
            var http = context.HttpContext;
            int status = http.Response.StatusCode;
            string code = status switch { 404 => "not_found", 405 => "method_not_allowed", _ => "http_" + status };
            string message = status switch
            {
                404 => $"No endpoint at {http.Request.Path}. The service offers POST /v1/resolve, GET /v1/health and GET /v1/registry.",
                405 => $"{http.Request.Method} is not allowed on {http.Request.Path}. Use POST for /v1/resolve and GET for /v1/health and /v1/registry.",
                _ => "The request could not be served.",
            };
            await TaskPhraseEndpointRouteBuilderExtensions.WriteErrorAsync(http, status, code, message).ConfigureAwait(false);
        });
        app.MapTaskPhrase();
        return new TaskPhraseServer(app, options);
    }

    /// <summary>The service's container (resolver, reloader, logging).</summary>
    public IServiceProvider Services => _app.Services;

    /// <summary>The reloader that owns the registry in force (call <see cref="RegistryReloader.Reload()"/> to re-read the file).</summary>
    public RegistryReloader Registry => _app.Services.GetRequiredService<RegistryReloader>();

    /// <summary>The addresses actually listened on, with real ports when port 0 was asked for. Empty before <see cref="StartAsync"/>.</summary>
    public IReadOnlyList<Uri> Addresses =>
        [.. (_app.Services.GetRequiredService<IServer>().Features.Get<IServerAddressesFeature>()?.Addresses ?? []).Select(a => new Uri(a))];

    /// <summary>
    /// Validates the options, loads the registry (embedding its phrases) and starts listening.
    /// </summary>
    /// <exception cref="OptionsValidationException">A TaskPhrase setting is invalid; the message names it.</exception>
    /// <exception cref="InvalidOperationException">The server ended up on a non-loopback address while remote access is not allowed.</exception>
    public async Task StartAsync(CancellationToken cancellationToken = default)
    {
        await _app.StartAsync(cancellationToken).ConfigureAwait(false);
        var logger = _app.Services.GetRequiredService<ILoggerFactory>().CreateLogger<TaskPhraseServer>();
        var bound = Addresses.Select(a => a.ToString().TrimEnd('/')).ToList();
        var remote = bound.Where(a => !LoopbackGuard.IsLoopback(a)).ToList();
        if (remote.Count > 0 && !_options.AllowRemote)
        {
            // Other configuration (e.g. a Kestrel section in appsettings.json) moved the endpoint: never stay up on it.
            await _app.StopAsync(CancellationToken.None).ConfigureAwait(false);
            throw new InvalidOperationException($"The server was bound to {string.Join(", ", remote)}, which is not loopback, and remote access is not allowed. Remove the other listen configuration or set AllowRemote.");
        }
        if (remote.Count > 0) logger.ListeningRemotely(string.Join(", ", remote));
        logger.Listening(string.Join(", ", bound));
    }

    /// <summary>Stops listening and waits up to <see cref="TaskPhraseServerOptions.ShutdownTimeout"/> for requests in flight.</summary>
    public Task StopAsync(CancellationToken cancellationToken = default) => _app.StopAsync(cancellationToken);

    /// <summary>Completes when the service has shut down (SIGTERM, Ctrl+C, <see cref="StopAsync"/>, or <paramref name="cancellationToken"/>).</summary>
    public Task WaitForShutdownAsync(CancellationToken cancellationToken = default) => _app.WaitForShutdownAsync(cancellationToken);

    /// <summary>Starts and runs until shutdown.</summary>
    public async Task RunAsync(CancellationToken cancellationToken = default)
    {
        await StartAsync(cancellationToken).ConfigureAwait(false);
        await WaitForShutdownAsync(cancellationToken).ConfigureAwait(false);
    }

    /// <summary>Releases the host and the services it created (not an embedding generator supplied as an instance).</summary>
    public ValueTask DisposeAsync() => _app.DisposeAsync();
}
