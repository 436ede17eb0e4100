using TaskPhrase.Onnx;

namespace TaskPhrase.Hosting.Tests;

/// <summary>
/// Loads the default model once for the whole test run and starts one real server on a free loopback port
/// serving the Harbor Street example registry. Shared by every class in <see cref="ServiceTestCollection"/>.
/// </summary>
public sealed class ServiceFixture : IAsyncLifetime
{
    public OnnxEmbedder Embedder { get; } = OnnxEmbedder.CreateDefault();

    public ServerHarness Harbor { get; private set; } = null!;

    public async Task InitializeAsync()
        => Harbor = await ServerHarness.StartAsync(Embedder, tp => tp.Configure(o => o.RegistryPath = TestPaths.HarborRegistry));

    public async Task DisposeAsync()
    {
        await Harbor.DisposeAsync();
        Embedder.Dispose();
    }
}

[CollectionDefinition(Name)]
public sealed class ServiceTestCollection : ICollectionFixture<ServiceFixture>
{
    public const string Name = "service";
}
