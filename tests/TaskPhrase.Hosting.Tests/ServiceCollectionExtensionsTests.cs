using Microsoft.Extensions.AI;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using TaskPhrase.Onnx;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class ServiceCollectionExtensionsTests(ServiceFixture fixture)
{
    private static IConfiguration Config(params (string Key, string Value)[] values)
        => new ConfigurationBuilder().AddInMemoryCollection(values.Select(v => new KeyValuePair<string, string?>(v.Key, v.Value))).Build();

    [Fact]
    public void AddTaskPhrase_ConfigurationSection_BindsEveryKey()
    {
        var config = Config(("TaskPhrase:RegistryPath", TestPaths.HarborRegistry), ("TaskPhrase:ModelDirectory", "all-minilm-l6-v2"),
            ("TaskPhrase:Accept", "0.7"), ("TaskPhrase:Margin", "0.05"), ("TaskPhrase:Threads", "1"),
            ("TaskPhrase:WatchRegistry", "false"), ("TaskPhrase:ReloadDebounce", "00:00:02"));
        var services = new ServiceCollection();
        services.AddTaskPhrase(config.GetSection(TaskPhraseOptions.SectionName));
        using var provider = services.BuildServiceProvider();
        var o = provider.GetRequiredService<IOptions<TaskPhraseOptions>>().Value;
        Assert.Equal((TestPaths.HarborRegistry, "all-minilm-l6-v2", 0.7f, 0.05f, 1, false, TimeSpan.FromSeconds(2)),
            (o.RegistryPath, o.ModelDirectory, o.Accept, o.Margin, o.Threads, o.WatchRegistry, o.ReloadDebounce));
    }

    [Fact]
    public void AddTaskPhrase_SuppliedGenerator_ResolverUsesItAsSingletonAndLeavesItUndisposed()
    {
        var services = new ServiceCollection();
        services.AddTaskPhrase(o => o.RegistryPath = TestPaths.HarborRegistry).UseEmbeddingGenerator(fixture.Embedder);
        TaskResolver first;
        using (var provider = services.BuildServiceProvider())
        {
            Assert.Same(fixture.Embedder, provider.GetRequiredService<IEmbeddingGenerator<string, Embedding<float>>>());
            first = provider.GetRequiredService<TaskResolver>();
            Assert.Same(first, provider.GetRequiredService<TaskResolver>());
            Assert.Same(first, provider.GetRequiredService<RegistryReloader>().Resolver);
            var r = first.Resolve("feed the goldfish");
            Assert.Equal((ResolutionOutcome.Accepted, "fish-food"), (r.Outcome, r.Task?.Id));
        }
        // The container did not own the embedder: it still works.
        Assert.Equal(384, fixture.Embedder.EmbedMany(["still alive"]).Vectors[0].Length);
    }

    [Fact]
    public void AddTaskPhrase_OverridesAndRegistryInCode_Applied()
    {
        var registry = RegistryLoader.Load(TestPaths.HarborRegistry);
        var services = new ServiceCollection();
        services.AddTaskPhrase(o => o.Accept = 0.99f).UseRegistry(registry).UseEmbeddingGenerator(fixture.Embedder);
        using var provider = services.BuildServiceProvider();
        var resolver = provider.GetRequiredService<TaskResolver>();
        Assert.Same(registry, resolver.Registry);
        // With accept forced to 0.99 a paraphrase (not an exact phrase) cannot be accepted.
        var r = resolver.Resolve("could you give the basil plant some water");
        Assert.Equal(RejectionReason.OutOfScope, r.Reason);
        Assert.Null(provider.GetRequiredService<RegistryReloader>().SourcePath);
    }

    [Fact]
    public void AddTaskPhrase_NoGeneratorSupplied_RegistersBuiltInOnnxEmbedder()
    {
        var services = new ServiceCollection();
        services.AddTaskPhrase(o => { o.RegistryPath = TestPaths.HarborRegistry; o.Threads = 1; });
        using var provider = services.BuildServiceProvider();
        var generator = provider.GetRequiredService<IEmbeddingGenerator<string, Embedding<float>>>();
        var onnx = Assert.IsType<OnnxEmbedder>(generator);
        Assert.Equal("all-minilm-l6-v2", onnx.Model.Id);
        Assert.Equal("all-minilm-l6-v2", generator.GetService<EmbeddingGeneratorMetadata>()?.DefaultModelId);
    }

    [Theory]
    [InlineData(null, null, "No registry to serve")]
    [InlineData("/nonexistent/registry.yaml", null, "TaskPhrase:RegistryPath: file '/nonexistent/registry.yaml' does not exist")]
    [InlineData("HARBOR", "/tmp/x.index", "are both set")]
    public async Task Start_BadRegistrySettings_FailsValidationNamingTheSetting(string? registry, string? index, string expected)
    {
        var e = await StartHostAsync(o => { o.RegistryPath = registry == "HARBOR" ? TestPaths.HarborRegistry : registry; o.IndexPath = index; });
        Assert.Contains(expected, e.Message);
    }

    [Fact]
    public async Task Start_OutOfRangeNumbers_EveryFailureReported()
    {
        var e = await StartHostAsync(o =>
        {
            o.RegistryPath = TestPaths.HarborRegistry;
            o.Accept = 1.5f;
            o.Margin = -0.1f;
            o.Threads = 999;
            o.ModelDirectory = "/nonexistent/model";
        });
        Assert.Equal(4, e.Failures.Count());
        Assert.Contains(e.Failures, f => f.StartsWith("TaskPhrase:Accept is 1.5"));
        Assert.Contains(e.Failures, f => f.StartsWith("TaskPhrase:Margin is -0.1"));
        Assert.Contains(e.Failures, f => f.StartsWith("TaskPhrase:Threads is 999"));
        Assert.Contains(e.Failures, f => f.StartsWith("TaskPhrase:ModelDirectory: '/nonexistent/model'"));
    }

    private async Task<OptionsValidationException> StartHostAsync(Action<TaskPhraseOptions> configure)
    {
        var builder = Host.CreateApplicationBuilder();
        builder.Logging.ClearProviders();
        builder.Services.AddTaskPhrase(configure).UseEmbeddingGenerator(fixture.Embedder);
        using var host = builder.Build();
        return await Assert.ThrowsAsync<OptionsValidationException>(() => host.StartAsync());
    }
}
