using System.Text.Json;
using TaskPhrase.Registry;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class HealthAndRegistryEndpointTests(ServiceFixture fixture)
{
    [Fact]
    public async Task Health_Running_ReportsRegistryModelUptimeAndLastReload()
    {
        var health = await fixture.Harbor.GetJsonAsync("/v1/health");
        Assert.Equal("ok", health.GetProperty("status").GetString());
        Assert.Equal(RegistryLoader.Load(TestPaths.HarborRegistry).ContentHash, health.GetProperty("registry").GetString());
        Assert.Equal(12, health.GetProperty("tasks").GetInt32());
        Assert.Equal("all-minilm-l6-v2", health.GetProperty("model").GetString());
        // SHA-256 of the bundled model.onnx as published in product.md ("Default model").
        Assert.Equal("4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2", health.GetProperty("model_sha256").GetString());
        Assert.True(health.GetProperty("uptime_s").GetDouble() > 0);
        var last = health.GetProperty("last_reload");
        Assert.True(last.GetProperty("ok").GetBoolean());
        Assert.Equal(JsonValueKind.Null, last.GetProperty("error").ValueKind);
    }

    [Fact]
    public async Task Health_Later_UptimeGrows()
    {
        double first = (await fixture.Harbor.GetJsonAsync("/v1/health")).GetProperty("uptime_s").GetDouble();
        await Task.Delay(50);
        double second = (await fixture.Harbor.GetJsonAsync("/v1/health")).GetProperty("uptime_s").GetDouble();
        Assert.True(second > first, $"{second} <= {first}");
    }

    [Fact]
    public async Task Registry_Harbor_ListsEveryTaskWithTitleConfirmAndController()
    {
        var body = await fixture.Harbor.GetJsonAsync("/v1/registry");
        var expected = RegistryLoader.Load(TestPaths.HarborRegistry);
        Assert.Equal(expected.ContentHash, body.GetProperty("registry").GetString());
        Assert.Equal("all-minilm-l6-v2", body.GetProperty("model").GetString());
        var tasks = body.GetProperty("tasks").EnumerateArray().ToList();
        // The twelve scenario tasks, in registry order (shared/design/scenario.md via examples/harbor-street/registry.yaml).
        Assert.Equal(["hall-light", "keys-hook", "mail-pickup", "water-basil", "page-turn", "phone-fetch", "pill-organizer",
                      "kettle-pour", "window-latch", "remote-fetch", "blanket", "fish-food"],
            tasks.Select(t => t.GetProperty("id").GetString()));
        foreach (var (json, task) in tasks.Zip(expected.Tasks))
        {
            Assert.Equal(task.Title, json.GetProperty("title").GetString());
            Assert.Equal(task.Confirm, json.GetProperty("confirm").GetBoolean());
            Assert.Equal(task.Controller.Manifold, json.GetProperty("controller").GetProperty("manifold").GetString());
            Assert.Equal(task.Controller.LatentDims, json.GetProperty("controller").GetProperty("latent_dims").GetInt32());
        }
        Assert.True(tasks.Single(t => t.GetProperty("id").GetString() == "kettle-pour").GetProperty("confirm").GetBoolean());
    }
}
