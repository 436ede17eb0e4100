using System.Runtime.InteropServices;
using Microsoft.Extensions.AI;
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

    /// <summary>
    /// An index checked against the generator's model (<see cref="TaskIndex.Load(string, EmbeddingModelInfo?)"/>).
    /// must_reject embeddings come from the index's <c>must_reject</c> section when it has one (as <c>taskphrase build</c>
    /// writes it); otherwise the few look-alike phrases are embedded when the index is installed.
    /// </summary>
    public static LoadedRegistry FromIndex(string path, IEmbeddingGenerator<string, Embedding<float>> generator)
        => new Indexed(TaskIndex.Load(path, generator.GetService(typeof(EmbeddingModelInfo)) as EmbeddingModelInfo), generator);

    private sealed class Plain(TaskRegistry registry) : LoadedRegistry
    {
        public override TaskRegistry Registry => registry;

        public override Task<TaskResolver> CreateResolverAsync(IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions options, CancellationToken cancellationToken)
            => TaskResolver.CreateAsync(registry, generator, options, cancellationToken);

        public override Task InstallAsync(TaskResolver resolver, CancellationToken cancellationToken)
            => resolver.ReloadAsync(registry, cancellationToken);
    }

    private sealed class Indexed(TaskIndex index, IEmbeddingGenerator<string, Embedding<float>> generator) : LoadedRegistry
    {
        /// <summary>Name of the index section with the must_reject embeddings (float32, little-endian, row-major).</summary>
        private const string MustRejectSection = "must_reject";

        public override TaskRegistry Registry => index.Registry;

        public override async Task<TaskResolver> CreateResolverAsync(IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions options, CancellationToken cancellationToken)
        {
            var rejects = await MustRejectAsync(cancellationToken).ConfigureAwait(false);
            return TaskResolver.FromEmbeddings(index.Registry, generator, index.Model, index.PhraseEmbeddings.Span, rejects, options);
        }

        public override async Task InstallAsync(TaskResolver resolver, CancellationToken cancellationToken)
        {
            var rejects = await MustRejectAsync(cancellationToken).ConfigureAwait(false);
            resolver.Reload(index.Registry, index.PhraseEmbeddings.Span, rejects);
        }

        private async Task<float[]> MustRejectAsync(CancellationToken cancellationToken)
        {
            if (index.Sections.TryGetValue(MustRejectSection, out var bytes))
                return MemoryMarshal.Cast<byte, float>(bytes.Span).ToArray();
            var texts = index.Registry.Tasks.SelectMany(t => t.MustReject).ToList();
            if (texts.Count == 0) return [];
            var embeddings = await generator.GenerateAsync(texts, null, cancellationToken).ConfigureAwait(false);
            var rows = new float[texts.Count * index.Dimensions];
            for (int i = 0; i < texts.Count; i++) embeddings[i].Vector.Span.CopyTo(rows.AsSpan(i * index.Dimensions, index.Dimensions));
            return rows;
        }
    }
}

