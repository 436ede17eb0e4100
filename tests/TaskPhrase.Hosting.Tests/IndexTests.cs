using System.Text.Json;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class IndexTests(ServiceFixture fixture)
{
    [Fact]
    public async Task Start_IndexPath_AnswersLikeTheRegistryItWasBuiltFrom()
    {
        using var file = new TempRegistry(TempRegistry.FourTasks);
        var registry = RegistryLoader.Load(file.Path);
        string indexPath = Path.Combine(file.Directory, "registry.tpx");
        await TaskIndexBuilder.BuildAsync(indexPath, registry, fixture.Embedder);

        await using var fromIndex = await ServerHarness.StartAsync(fixture.Embedder, tp => tp.Configure(o => o.IndexPath = indexPath));
        await using var fromRegistry = await ServerHarness.StartAsync(fixture.Embedder, tp => tp.Configure(o => o.RegistryPath = file.Path));
        var health = await fromIndex.GetJsonAsync("/v1/health");
        Assert.Equal(registry.ContentHash, health.GetProperty("registry").GetString());
        Assert.Equal(indexPath, health.GetProperty("registry_path").GetString());
        foreach (var utterance in new[] { "hang up my keys", "pour boiling water from the kettle over the basil", "could you give the basil some water", "what time is it" })
        {
            var a = await fromIndex.ResolveAsync(utterance);
            var b = await fromRegistry.ResolveAsync(utterance);
            foreach (var key in new[] { "outcome", "task", "phrase", "reason", "registry", "model" })
                Assert.True(JsonElement.DeepEquals(b.GetProperty(key), a.GetProperty(key)), $"{utterance}: {key}");
            if (b.GetProperty("score").ValueKind == JsonValueKind.Number)
                Assert.Equal(b.GetProperty("score").GetDouble(), a.GetProperty("score").GetDouble(), 1e-4);
        }
    }

    [Fact]
    public async Task Watch_IndexRebuilt_SwapsToNewRegistry()
    {
        using var file = new TempRegistry(TempRegistry.ThreeTasks);
        string indexPath = Path.Combine(file.Directory, "registry.tpx");
        await TaskIndexBuilder.BuildAsync(indexPath, RegistryLoader.Load(file.Path), fixture.Embedder);
        await using var server = await ServerHarness.StartAsync(fixture.Embedder, tp => tp.Configure(o =>
        {
            o.IndexPath = indexPath;
            o.ReloadDebounce = TimeSpan.FromMilliseconds(100);
        }));
        Assert.Equal("rejected", (await server.ResolveAsync("hang up my keys")).GetProperty("outcome").GetString());

        file.Replace(TempRegistry.FourTasks);
        var next = RegistryLoader.Load(file.Path);
        await TaskIndexBuilder.BuildAsync(indexPath, next, fixture.Embedder);   // written atomically (temp file + rename)
        Assert.True(await Poll.UntilAsync(async () => (await server.GetJsonAsync("/v1/health")).GetProperty("registry").GetString() == next.ContentHash,
            TimeSpan.FromSeconds(20)), "the rebuilt index was not picked up");
        Assert.Equal("keys-hook", (await server.ResolveAsync("hang up my keys")).GetProperty("task").GetString());
    }

    [Fact]
    public async Task Start_IndexFromAnotherModel_Refused()
    {
        using var file = new TempRegistry(TempRegistry.ThreeTasks);
        var registry = RegistryLoader.Load(file.Path);
        var other = fixture.Embedder.Model with { Id = "some-other-model", Sha256 = new string('0', 64) };
        string indexPath = Path.Combine(file.Directory, "registry.tpx");
        TaskIndex.Write(indexPath, registry, other, new float[registry.Tasks.Sum(t => t.Phrases.Count) * other.Dimensions]);
        var e = await Assert.ThrowsAsync<IndexException>(() => ServerHarness.StartAsync(fixture.Embedder, tp => tp.Configure(o => o.IndexPath = indexPath)));
        Assert.Contains("some-other-model", e.Message);
    }
}
