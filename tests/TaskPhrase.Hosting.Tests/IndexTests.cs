using System.Text.Json;
using TaskPhrase.Registry;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class IndexTests(ServiceFixture fixture)
{
    [Fact]
    public async Task Start_IndexPath_AnswersLikeTheRegistryItWasBuiltFrom()
    {
        using var file = new TempRegistry(TempRegistry.FourTasks);
        var registry = RegistryLoader.Load(file.Path);
        var (vectors, _) = fixture.Embedder.EmbedMany([.. registry.Tasks.SelectMany(t => t.Phrases)]);
        string indexPath = Path.Combine(file.Directory, "registry.tpx");
        // No must_reject section: the service embeds the look-alike phrases itself.
        TaskIndex.Write(indexPath, registry, fixture.Embedder.Model, vectors.SelectMany(v => v).ToArray());

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
