using Microsoft.Extensions.AI;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using TaskPhrase.Registry;

namespace TaskPhrase.Hosting;

/// <summary>
/// Returned by <c>services.AddTaskPhrase(...)</c>: further, optional configuration of the TaskPhrase services
/// (a registry or embedding generator supplied in code, a custom registry reader).
/// </summary>
public sealed class TaskPhraseBuilder
{
    private readonly RegistrySources _sources;

    internal TaskPhraseBuilder(IServiceCollection services, RegistrySources sources)
    {
        Services = services;
        _sources = sources;
    }

    /// <summary>The service collection the TaskPhrase services were added to.</summary>
    public IServiceCollection Services { get; }

    /// <summary>Adds a configuration step for <see cref="TaskPhraseOptions"/> (runs after configuration binding).</summary>
    public TaskPhraseBuilder Configure(Action<TaskPhraseOptions> configure)
    {
        ArgumentNullException.ThrowIfNull(configure);
        Services.Configure(configure);
        return this;
    }

    /// <summary>
    /// Serves <paramref name="registry"/>, built in code, instead of a registry file; <see cref="TaskPhraseOptions.RegistryPath"/>
    /// and <see cref="TaskPhraseOptions.IndexPath"/> must then be unset. Nothing is watched; reload with <see cref="RegistryReloader.Reload(TaskRegistry)"/>.
    /// </summary>
    public TaskPhraseBuilder UseRegistry(TaskRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(registry);
        _sources.Registry = registry;
        return this;
    }

    /// <summary>
    /// Reads registry files with <paramref name="loader"/>, which must validate and throw with a located message
    /// (file, line, column) when the file is broken. Used at start and on every reload.
    /// </summary>
    public TaskPhraseBuilder UseRegistryLoader(Func<string, TaskRegistry> loader)
    {
        ArgumentNullException.ThrowIfNull(loader);
        _sources.Loader = loader;
        return this;
    }

    /// <summary>
    /// Uses <paramref name="generator"/> for embeddings instead of the built-in ONNX model (registered as the
    /// container's <see cref="IEmbeddingGenerator{TInput, TEmbedding}"/>). The caller keeps ownership: the container
    /// does not dispose it. Any implementation works; one that also offers <c>TaskPhrase.Embedding.ISpanEmbedder</c> is faster.
    /// </summary>
    public TaskPhraseBuilder UseEmbeddingGenerator(IEmbeddingGenerator<string, Embedding<float>> generator)
    {
        ArgumentNullException.ThrowIfNull(generator);
        Services.Replace(ServiceDescriptor.Singleton(generator));
        return this;
    }

    /// <summary>Builds the embedding generator with <paramref name="factory"/> (once: singleton); the container disposes it.</summary>
    public TaskPhraseBuilder UseEmbeddingGenerator(Func<IServiceProvider, IEmbeddingGenerator<string, Embedding<float>>> factory)
    {
        ArgumentNullException.ThrowIfNull(factory);
        Services.Replace(ServiceDescriptor.Singleton(factory));
        return this;
    }
}
