using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution;

[Collection(ModelCollection.Name)]
public class TaskIndexBuilderTests(ModelFixture fixture)
{
    private const string Yaml = """
        version: 1
        scoring: head
        defaults: {accept: 0.2, margin: 0.0}
        tasks:
          - id: water-basil
            title: Water the basil
            controller: {manifold: pour-arc.v2, latent_dims: 2}
            phrases: [water the basil, give the basil a drink, pour water on the basil plant]
            must_reject: [pour the hot water on the basil]
          - id: hall-light
            title: Press the hall light switch
            controller: {manifold: reach-press.v1, latent_dims: 1}
            phrases: [turn on the hall light, press the hall light switch, hall light please]
        """;

    [Fact]
    public async Task BuildAsync_HeadRegistry_StoresHeadAndResolvesLikeFreshResolver()
    {
        var registry = RegistryLoader.Parse(Yaml, "head.yaml");
        string path = Path.Combine(Path.GetTempPath(), $"tp-head-{Guid.NewGuid():N}.idx");
        try
        {
            var index = await TaskIndexBuilder.BuildAsync(path, registry, fixture.Embedder);
            Assert.True(index.Sections.ContainsKey(TaskIndexBuilder.HeadSection));
            Assert.True(index.Sections.ContainsKey(TaskIndexBuilder.MustRejectSection));
            var fromIndex = TaskResolver.FromIndex(TaskIndex.Load(path, fixture.Embedder.Model), fixture.Embedder);
            var fresh = TaskResolver.Create(registry, fixture.Embedder);
            Assert.Equal(ScoringStrategy.Head, fromIndex.Scoring);
            foreach (var u in new[] { "could you water my basil", "switch the hallway light on", "what time is it" })
            {
                var a = fromIndex.Resolve(u);
                var b = fresh.Resolve(u);
                Assert.Equal((b.Outcome, b.Reason, b.Task?.Id), (a.Outcome, a.Reason, a.Task?.Id));
                Assert.Equal(b.Score!.Value, a.Score!.Value, 1e-5);
            }
            // Same registry and model → byte-identical index (deterministic training, no timestamps).
            string again = path + ".2";
            await TaskIndexBuilder.BuildAsync(again, registry, fixture.Embedder);
            Assert.Equal(File.ReadAllBytes(path), File.ReadAllBytes(again));
            File.Delete(again);
        }
        finally { File.Delete(path); }
    }
}
