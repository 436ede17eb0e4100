using System.Collections.Concurrent;
using System.Text.Json;
using TaskPhrase.Registry;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class ReloadTests(ServiceFixture fixture)
{
    private static readonly TimeSpan Deadline = TimeSpan.FromSeconds(20);

    private Task<ServerHarness> StartAsync(TempRegistry file, bool watch = true) => ServerHarness.StartAsync(fixture.Embedder, tp => tp.Configure(o =>
    {
        o.RegistryPath = file.Path;
        o.WatchRegistry = watch;
        o.ReloadDebounce = TimeSpan.FromMilliseconds(100);
    }));

    private static async Task<string?> HealthRegistryAsync(ServerHarness server)
        => (await server.GetJsonAsync("/v1/health")).GetProperty("registry").GetString();

    [Fact]
    public async Task Watch_FileReplacedDuringTraffic_SwapsWithoutFailedRequest()
    {
        using var file = new TempRegistry(TempRegistry.ThreeTasks);
        string oldHash = RegistryLoader.Load(file.Path).ContentHash;
        await using var server = await StartAsync(file);
        Assert.Equal(oldHash, await HealthRegistryAsync(server));

        var failures = new ConcurrentQueue<string>();
        var seen = new ConcurrentQueue<(int Client, int Order, string Hash)>();
        using var stop = new CancellationTokenSource();
        using var hardStop = new CancellationTokenSource(TimeSpan.FromMinutes(1));
        var clients = Enumerable.Range(0, 4).Select(c => Task.Run(async () =>
        {
            using var client = new HttpClient { BaseAddress = server.BaseAddress, Timeout = TimeSpan.FromSeconds(30) };
            for (int i = 0; i < 400 && !stop.IsCancellationRequested && !hardStop.IsCancellationRequested; i++)
            {
                // Alternate single requests with batches, so some requests are in flight across the swap.
                string json = i % 3 == 0
                    ? JsonSerializer.Serialize(new { utterances = Enumerable.Repeat("could you hang my keys up", 32).Append("light in the hall please") })
                    : JsonSerializer.Serialize(new { utterance = i % 2 == 0 ? "hang up my keys" : "give the basil some water" });
                try
                {
                    using var response = await client.PostAsync("/v1/resolve", new StringContent(json, System.Text.Encoding.UTF8, "application/json"));
                    string body = await response.Content.ReadAsStringAsync();
                    if (!response.IsSuccessStatusCode) { failures.Enqueue($"{(int)response.StatusCode}: {body}"); continue; }
                    using var doc = JsonDocument.Parse(body);
                    var first = doc.RootElement.TryGetProperty("resolutions", out var list) ? list[0] : doc.RootElement;
                    seen.Enqueue((c, i, first.GetProperty("registry").GetString()!));
                }
                catch (Exception e) when (e is HttpRequestException or TaskCanceledException)
                {
                    failures.Enqueue(e.Message);
                }
            }
        })).ToArray();

        Assert.True(await Poll.UntilAsync(() => Task.FromResult(seen.Count >= 8), Deadline), "traffic did not start");
        file.Replace(TempRegistry.FourTasks);
        string newHash = RegistryLoader.Load(file.Path).ContentHash;
        Assert.NotEqual(oldHash, newHash);
        Assert.True(await Poll.UntilAsync(async () => await HealthRegistryAsync(server) == newHash, Deadline), "the edit was not picked up");
        int atSwap = seen.Count;
        Assert.True(await Poll.UntilAsync(() => Task.FromResult(seen.Count >= atSwap + 8), Deadline), "traffic stalled after the swap");
        stop.Cancel();
        await Task.WhenAll(clients);

        Assert.Empty(failures);
        var hashes = seen.ToList();
        Assert.Contains(hashes, h => h.Hash == oldHash);
        Assert.Contains(hashes, h => h.Hash == newHash);
        Assert.All(hashes, h => Assert.True(h.Hash == oldHash || h.Hash == newHash, h.Hash));
        // Atomic swap: once a client has seen the new registry it never sees the old one again.
        foreach (var perClient in hashes.GroupBy(h => h.Client))
        {
            var ordered = perClient.OrderBy(h => h.Order).Select(h => h.Hash).ToList();
            int firstNew = ordered.IndexOf(newHash);
            if (firstNew >= 0) Assert.DoesNotContain(oldHash, ordered.Skip(firstNew));
        }
        // The added task now resolves.
        Assert.Equal("keys-hook", (await server.ResolveAsync("hang up my keys")).GetProperty("task").GetString());
    }

    [Fact]
    public async Task Watch_BrokenEdit_KeepsOldRegistryAndReportsInHealthAndLog()
    {
        using var file = new TempRegistry(TempRegistry.ThreeTasks);
        string oldHash = RegistryLoader.Load(file.Path).ContentHash;
        await using var server = await StartAsync(file);

        file.Replace(TempRegistry.Broken);
        JsonElement health = default;
        Assert.True(await Poll.UntilAsync(async () =>
        {
            health = await server.GetJsonAsync("/v1/health");
            return health.GetProperty("status").GetString() == "degraded";
        }, Deadline), "the broken edit was not reported");
        Assert.Equal(oldHash, health.GetProperty("registry").GetString());
        string error = health.GetProperty("last_reload").GetProperty("error").GetString()!;
        // The loader's located diagnostic: file, line 6, the unknown key (its own error format, "path:line:column: error code: ...").
        Assert.Contains($"{file.Path}:6:", error);
        Assert.Contains("phrazes", error);
        Assert.Contains(server.Logs.Entries, e => e.Level == Microsoft.Extensions.Logging.LogLevel.Error && e.Message.Contains("still serving registry " + oldHash));

        // Still serving the old registry.
        var r = await server.ResolveAsync("turn on the hall light");
        Assert.Equal(("accepted", oldHash), (r.GetProperty("outcome").GetString(), r.GetProperty("registry").GetString()));

        // Fixing the file recovers.
        file.Replace(TempRegistry.FourTasks);
        string fixedHash = RegistryLoader.Load(file.Path).ContentHash;
        Assert.True(await Poll.UntilAsync(async () =>
        {
            health = await server.GetJsonAsync("/v1/health");
            return health.GetProperty("status").GetString() == "ok" && health.GetProperty("registry").GetString() == fixedHash;
        }, Deadline), "the fixed file was not picked up");
    }

    [Fact]
    public async Task Reload_Manual_SwapsOnlyWhenCalled()
    {
        using var file = new TempRegistry(TempRegistry.ThreeTasks);
        string oldHash = RegistryLoader.Load(file.Path).ContentHash;
        await using var server = await StartAsync(file, watch: false);
        Assert.False(server.Server.Registry.IsWatching);

        file.Replace(TempRegistry.FourTasks);
        await Task.Delay(400);
        Assert.Equal(oldHash, await HealthRegistryAsync(server));

        var status = server.Server.Registry.Reload();
        Assert.True(status.Succeeded && status.Changed, status.Error);
        Assert.Equal(RegistryLoader.Load(file.Path).ContentHash, status.RegistryHash);
        Assert.Equal(status.RegistryHash, await HealthRegistryAsync(server));

        // Reloading an unchanged file succeeds without a swap.
        var again = server.Server.Registry.Reload();
        Assert.True(again.Succeeded);
        Assert.False(again.Changed);
    }

    [Fact]
    public async Task Start_BrokenRegistry_FailsWithLocatedError()
    {
        using var file = new TempRegistry(TempRegistry.Broken);
        var e = await Assert.ThrowsAsync<RegistryException>(() => StartAsync(file));
        Assert.Contains(e.Errors, d => d.Line == 6);
    }
}
