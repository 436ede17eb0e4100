using System.Runtime.InteropServices;
using Microsoft.Extensions.AI;
using TaskPhrase.Conditioning;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;

namespace TaskPhrase.Resolution;

/// <summary>
/// Compiles a registry into an index: embeds every approved and look-alike phrase once, optionally precomputes the
/// FiLM conditioning of every approved phrase, and writes it all with checksums (see <see cref="TaskIndex"/>).
/// Loading such an index needs no model forward passes.
/// </summary>
public static class TaskIndexBuilder
{
    /// <summary>Index section holding the must_reject embeddings (float32, little-endian, row-major).</summary>
    public const string MustRejectSection = "must_reject";

    /// <summary>Index section holding the FiLM conditioning table (<see cref="FilmTable.ToBytes"/>).</summary>
    public const string FilmSection = "film";

    /// <summary>Index section holding the learned task head (<see cref="Scoring.TaskHead.ToBytes"/>), for registries with <c>scoring: head</c>.</summary>
    public const string HeadSection = "head";

    /// <summary>Embeds the registry's phrases and writes the index to <paramref name="path"/>.</summary>
    /// <param name="path">Output file; written atomically.</param>
    /// <param name="registry">The registry.</param>
    /// <param name="generator">The embedding generator; it must expose <see cref="EmbeddingModelInfo"/> through <c>GetService</c>.</param>
    /// <param name="film">Optional FiLM generator whose conditioning table is stored with the index.</param>
    /// <param name="cancellationToken">Cancels the embedding call.</param>
    /// <returns>The index as written.</returns>
    /// <exception cref="InvalidOperationException">The generator does not identify its model.</exception>
    public static async Task<TaskIndex> BuildAsync(string path, TaskRegistry registry, IEmbeddingGenerator<string, Embedding<float>> generator,
        FilmGenerator? film = null, CancellationToken cancellationToken = default)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(registry);
        ArgumentNullException.ThrowIfNull(generator);
        var model = generator.GetService(typeof(EmbeddingModelInfo)) as EmbeddingModelInfo
            ?? throw new InvalidOperationException("The embedding generator does not expose EmbeddingModelInfo; an index must record the model's SHA-256.");
        var texts = registry.Tasks.SelectMany(t => t.Phrases).Concat(registry.Tasks.SelectMany(t => t.MustReject)).ToList();
        var embeddings = await generator.GenerateAsync(texts, null, cancellationToken).ConfigureAwait(false);
        int phraseCount = registry.Tasks.Sum(t => t.Phrases.Count), dims = model.Dimensions;
        var phrases = new float[phraseCount * dims];
        var rejects = new float[(texts.Count - phraseCount) * dims];
        for (int i = 0; i < texts.Count; i++)
        {
            var v = embeddings[i].Vector.Span;
            if (v.Length != dims) throw new InvalidOperationException($"The generator returned {v.Length} dimensions; the model card says {dims}.");
            v.CopyTo(i < phraseCount ? phrases.AsSpan(i * dims) : rejects.AsSpan((i - phraseCount) * dims));
        }
        var sections = new Dictionary<string, byte[]>(StringComparer.Ordinal)
        {
            [MustRejectSection] = MemoryMarshal.AsBytes(rejects.AsSpan()).ToArray(),
        };
        if (film is not null) sections[FilmSection] = FilmTable.Build(film, phrases, dims).ToBytes();
        if (registry.Settings.Scoring == "head")
        {
            // Trained once, deterministically, from the approved phrases (and must_reject as a reject class): never from probes.
            var phraseTask = new int[phraseCount];
            for (int t = 0, row = 0; t < registry.Tasks.Count; t++)
                for (int p = 0; p < registry.Tasks[t].Phrases.Count; p++) phraseTask[row++] = t;
            sections[HeadSection] = Scoring.TaskHead.Train(phrases, phraseTask, registry.Tasks.Count, rejects, dims, RegistryScoring.LearnedFor(registry)).ToBytes();
        }
        TaskIndex.Write(path, registry, model, phrases, sections);
        return TaskIndex.Load(path, model, registry.ContentHash);
    }
}
