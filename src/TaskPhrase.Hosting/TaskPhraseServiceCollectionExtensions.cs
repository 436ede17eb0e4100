using Microsoft.Extensions.AI;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using TaskPhrase.Onnx;
using TaskPhrase.Resolution;

namespace TaskPhrase.Hosting;

/// <summary>Registers TaskPhrase in a dependency-injection container.</summary>
public static class TaskPhraseServiceCollectionExtensions
{
    /// <summary>
    /// Adds the TaskPhrase services, all singletons: <see cref="IEmbeddingGenerator{TInput, TEmbedding}"/> of
    /// <see cref="Embedding{T}"/> (the built-in ONNX embedder unless one is registered already or set with
    /// <see cref="TaskPhraseBuilder.UseEmbeddingGenerator(IEmbeddingGenerator{string, Embedding{float}})"/>),
    /// <see cref="RegistryReloader"/>, <see cref="TaskResolver"/>, and a hosted service that loads the registry at
    /// start and watches its file. <see cref="TaskPhraseOptions"/> is validated when the host starts
    /// (<c>ValidateOnStart</c>); without a host, when the resolver is first requested.
    /// </summary>
    /// <param name="services">The service collection.</param>
    /// <param name="configure">Sets the options in code; null to rely on other configuration.</param>
    /// <returns>A builder for further configuration.</returns>
    public static TaskPhraseBuilder AddTaskPhrase(this IServiceCollection services, Action<TaskPhraseOptions>? configure = null)
    {
        ArgumentNullException.ThrowIfNull(services);
        var builder = AddCore(services);
        if (configure is not null) services.Configure(configure);
        return builder;
    }

    /// <summary>
    /// Adds the TaskPhrase services (see <see cref="AddTaskPhrase(IServiceCollection, Action{TaskPhraseOptions})"/>) with
    /// <see cref="TaskPhraseOptions"/> bound from <paramref name="section"/>, usually
    /// <c>configuration.GetSection(TaskPhraseOptions.SectionName)</c> (keys <c>ModelDirectory</c>, <c>RegistryPath</c>,
    /// <c>IndexPath</c>, <c>Accept</c>, <c>Margin</c>, <c>Threads</c>, <c>WatchRegistry</c>, <c>ReloadDebounce</c>).
    /// </summary>
    public static TaskPhraseBuilder AddTaskPhrase(this IServiceCollection services, IConfiguration section)
    {
        ArgumentNullException.ThrowIfNull(services);
        ArgumentNullException.ThrowIfNull(section);
        var builder = AddCore(services);
        services.AddOptions<TaskPhraseOptions>().Bind(section);
        return builder;
    }

    private static TaskPhraseBuilder AddCore(IServiceCollection services)
    {
        var sources = services.FirstOrDefault(d => d.ServiceType == typeof(RegistrySources))?.ImplementationInstance as RegistrySources;
        if (sources is null)
        {
            sources = new RegistrySources();
            services.AddSingleton(sources);
            services.AddOptions<TaskPhraseOptions>().ValidateOnStart();
            services.TryAddEnumerable(ServiceDescriptor.Singleton<IValidateOptions<TaskPhraseOptions>, TaskPhraseOptionsValidator>());
            services.TryAddSingleton<IEmbeddingGenerator<string, Embedding<float>>>(CreateEmbedder);
            services.TryAddSingleton(CreateReloader);
            services.TryAddSingleton(sp => sp.GetRequiredService<RegistryReloader>().Resolver);
            services.TryAddEnumerable(ServiceDescriptor.Singleton<IHostedService, RegistryWatchService>());
        }
        return new TaskPhraseBuilder(services, sources);
    }

    private static OnnxEmbedder CreateEmbedder(IServiceProvider services)
    {
        var options = services.GetRequiredService<IOptions<TaskPhraseOptions>>().Value;
        var onnx = new OnnxEmbedderOptions { IntraOpThreads = options.Threads };
        return options.ModelDirectory is { Length: > 0 } model ? OnnxEmbedder.Create(model, onnx) : OnnxEmbedder.CreateDefault(onnx);
    }

    private static RegistryReloader CreateReloader(IServiceProvider services)
    {
        var options = services.GetRequiredService<IOptions<TaskPhraseOptions>>().Value;
        var sources = services.GetRequiredService<RegistrySources>();
        var generator = services.GetRequiredService<IEmbeddingGenerator<string, Embedding<float>>>();
        var logger = services.GetService<ILoggerFactory>()?.CreateLogger<RegistryReloader>();
        var resolverOptions = new ResolverOptions { AcceptOverride = options.Accept, MarginOverride = options.Margin };
        if (sources.Registry is { } registry)
            return RegistryReloader.CreateAsync(registry, generator, resolverOptions, logger).GetAwaiter().GetResult();
        var loader = sources.Loader;
        Func<string, LoadedRegistry> load = options.IndexPath is { Length: > 0 }
            ? path => LoadedRegistry.FromIndex(path, generator)
            : path => LoadedRegistry.FromRegistry(loader(path));
        return RegistryReloader.CreateAsync(options.IndexPath is { Length: > 0 } index ? index : options.RegistryPath!, load, generator, resolverOptions,
            options.ReloadDebounce, logger).GetAwaiter().GetResult();
    }
}
