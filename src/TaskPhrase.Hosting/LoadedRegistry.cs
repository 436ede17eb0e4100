using System.Runtime.InteropServices;
using Microsoft.Extensions.AI;
using TaskPhrase.Conditioning;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Hosting;

/// <summary>
/// A registry read and validated from its source, not yet in force: either a registry (its phrases are embedded
/// when it is installed) or a compiled index (precomputed embeddings, no forward passes).
/// </summary>
internal abstract class LoadedRegistry
{
    public abstract TaskRegistry Registry { get; }

    /// <summary>Creates the first resolver.</summary>
    public abstract Task<TaskResolver> CreateResolverAsync(IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions options, CancellationToken cancellationToken);

    /// <summary>Swaps this registry into <paramref name="resolver"/> atomically (everything is computed first).</summary>
    public abstract Task InstallAsync(TaskResolver resolver, CancellationToken cancellationToken);

    public static LoadedRegistry FromRegistry(TaskRegistry registry) => new Plain(registry);

    /// <summary>An index checked against the generator's model (<see cref="TaskIndex.Load(string, EmbeddingModelInfo?)"/>).</summary>
    public static LoadedRegistry FromIndex(string path, IEmbeddingGenerator<string, Embedding<float>> generator)
        => new Indexed(TaskIndex.Load(path, generator.GetService(typeof(EmbeddingModelInfo)) as EmbeddingModelInfo));

    private sealed class Plain(TaskRegistry registry) : LoadedRegistry
    {
        public override TaskRegistry Registry => registry;

        public override Task<TaskResolver> CreateResolverAsync(IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions options, CancellationToken cancellationToken)
            => TaskResolver.CreateAsync(registry, generator, options, cancellationToken);

        public override Task InstallAsync(TaskResolver resolver, CancellationToken cancellationToken)
            => resolver.ReloadAsync(registry, cancellationToken);
    }

    private sealed class Indexed(TaskIndex index) : LoadedRegistry
    {
        public override TaskRegistry Registry => index.Registry;

        public override Task<TaskResolver> CreateResolverAsync(IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions options, CancellationToken cancellationToken)
            => Task.FromResult(TaskResolver.FromIndex(index, generator, options));

        public override Task InstallAsync(TaskResolver resolver, CancellationToken cancellationToken)
        {
            // Everything is read and checked before the one atomic swap; a malformed section leaves the registry in force.
            resolver.Reload(index);
            return Task.CompletedTask;
        }
    }
}
