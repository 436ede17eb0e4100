using System.Diagnostics;
using System.Text.Json;
using TaskPhrase.Hosting.Tests.TestDoubles;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class TimeoutAndShutdownTests(ServiceFixture fixture)
{
    [Fact]
    public async Task Resolve_SlowerThanRequestTimeout_503TimeoutJson()
    {
        // RFC 9110 §15.6.4: 503 Service Unavailable, the server is temporarily unable to handle the request.
        using var file = new TempRegistry(TempRegistry.ThreeTasks);
        var slow = new SlowEmbeddingGenerator(fixture.Embedder);
        await using var server = await ServerHarness.StartAsync(slow, tp => tp.Configure(o => o.RegistryPath = file.Path),
            new TaskPhraseServerOptions { RequestTimeout = TimeSpan.FromMilliseconds(300) });
        slow.Delay = TimeSpan.FromSeconds(20);
        var clock = Stopwatch.StartNew();
        using var response = await server.PostResolveAsync("{\"utterance\": \"could you give the basil a drink of water\"}");
        var error = await ServerHarness.ReadJsonAsync(response, 503);
        Assert.Equal("timeout", error.GetProperty("error").GetString());
        Assert.True(clock.Elapsed < TimeSpan.FromSeconds(10), $"took {clock.Elapsed}");
    }

    [Fact]
    public async Task Stop_RequestInFlight_CompletesBeforeShutdown()
    {
        using var file = new TempRegistry(TempRegistry.ThreeTasks);
        var slow = new SlowEmbeddingGenerator(fixture.Embedder);
        await using var server = await ServerHarness.StartAsync(slow, tp => tp.Configure(o => o.RegistryPath = file.Path));
        slow.Delay = TimeSpan.FromMilliseconds(800);
        var inFlight = server.PostResolveAsync("{\"utterance\": \"could you give the basil a drink of water\"}");
        Assert.True(await Poll.UntilAsync(() => Task.FromResult(slow.Started > 0), TimeSpan.FromSeconds(10)), "request did not start");
        // What SIGTERM does: the host's graceful stop, which waits for requests in flight.
        await server.Server.StopAsync();
        using var response = await inFlight;
        var r = await ServerHarness.ReadJsonAsync(response, 200);
        Assert.Equal("could you give the basil a drink of water", r.GetProperty("utterance").GetString());
        // After the stop nothing listens any more.
        using var fresh = new HttpClient { BaseAddress = server.BaseAddress, Timeout = TimeSpan.FromSeconds(5) };
        await Assert.ThrowsAsync<HttpRequestException>(() => fresh.GetAsync("/v1/health"));
    }
}
