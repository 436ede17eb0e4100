using System.Net.Http.Headers;
using System.Text;
using System.Text.Json;
using Microsoft.Extensions.AI;
using Microsoft.Extensions.Logging;
using TaskPhrase.Hosting.Tests.TestDoubles;

namespace TaskPhrase.Hosting.Tests;

/// <summary>A real <see cref="TaskPhraseServer"/> on 127.0.0.1 with a free port, and an HttpClient talking to it.</summary>
public sealed class ServerHarness : IAsyncDisposable
{
    private ServerHarness(TaskPhraseServer server, HttpClient client, CapturingLoggerProvider logs)
    {
        Server = server;
        Client = client;
        Logs = logs;
    }

    public TaskPhraseServer Server { get; }

    public HttpClient Client { get; }

    /// <summary>Every log entry of the server, at every level (Trace included).</summary>
    public CapturingLoggerProvider Logs { get; }

    public Uri BaseAddress => Client.BaseAddress!;

    public static async Task<ServerHarness> StartAsync(IEmbeddingGenerator<string, Embedding<float>> generator, Action<TaskPhraseBuilder> configure,
        TaskPhraseServerOptions? options = null)
    {
        options ??= new TaskPhraseServerOptions();
        options.Urls = "http://127.0.0.1:0";
        var logs = new CapturingLoggerProvider();
        var server = TaskPhraseServer.Create(options, tp =>
        {
            tp.UseEmbeddingGenerator(generator);
            configure(tp);
        }, host =>
        {
            host.Logging.ClearProviders();
            host.Logging.AddProvider(logs);
            host.Logging.SetMinimumLevel(LogLevel.Trace);
        });
        try
        {
            await server.StartAsync();
        }
        catch
        {
            await server.DisposeAsync();
            throw;
        }
        var address = server.Addresses.Single();
        Assert.True(LoopbackGuard.IsLoopback(address.ToString()), $"server bound to {address}");
        var client = new HttpClient { BaseAddress = address, Timeout = TimeSpan.FromSeconds(60) };
        return new ServerHarness(server, client, logs);
    }

    /// <summary>POSTs <paramref name="json"/> to /v1/resolve with Content-Type application/json.</summary>
    public Task<HttpResponseMessage> PostResolveAsync(string json, string contentType = "application/json")
    {
        var content = new StringContent(json, Encoding.UTF8);
        content.Headers.ContentType = MediaTypeHeaderValue.Parse(contentType);
        return Client.PostAsync("/v1/resolve", content);
    }

    public async Task<JsonElement> ResolveAsync(string utterance)
    {
        using var response = await PostResolveAsync(JsonSerializer.Serialize(new { utterance }));
        return await ReadJsonAsync(response, 200);
    }

    public async Task<JsonElement> GetJsonAsync(string path)
    {
        using var response = await Client.GetAsync(path);
        return await ReadJsonAsync(response, 200);
    }

    /// <summary>Asserts the status and a JSON content type, and returns the parsed body.</summary>
    public static async Task<JsonElement> ReadJsonAsync(HttpResponseMessage response, int expectedStatus)
    {
        string body = await response.Content.ReadAsStringAsync();
        Assert.True(expectedStatus == (int)response.StatusCode, $"expected {expectedStatus}, got {(int)response.StatusCode}: {body}");
        Assert.Equal("application/json", response.Content.Headers.ContentType?.MediaType);
        using var document = JsonDocument.Parse(body);
        return document.RootElement.Clone();
    }

    public async ValueTask DisposeAsync()
    {
        Client.Dispose();
        await Server.DisposeAsync();
    }
}
