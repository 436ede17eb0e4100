using System.Diagnostics;
using Microsoft.Extensions.AI;
using TaskPhrase.Conditioning;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;

namespace TaskPhrase.Resolution;

/// <summary>
/// Resolves utterances to the nearest approved task of a registry, and refuses — with a reason — input that is
/// empty, unintelligible, out of scope, ambiguous, a known look-alike, negated or hazardous.
/// Works with any <see cref="IEmbeddingGenerator{TInput, TEmbedding}"/> of <see cref="Embedding{T}"/> of float.
/// </summary>
/// <remarks>
/// Thread-safe: any number of threads may resolve at once. <see cref="Reload(TaskRegistry, CancellationToken)"/>
/// swaps the registry atomically; calls in flight finish on the registry they started with.
/// The resolver does not own the generator: dispose the generator yourself.
/// </remarks>
public sealed partial class TaskResolver
{
    private readonly IEmbeddingGenerator<string, Embedding<float>> _generator;
    private readonly ISpanEmbedder? _span;
    private readonly ResolverOptions _options;
    private readonly EmbeddingModelInfo _model;
    private ResolverState _state;
    private FilmGenerator? _film;

    private TaskResolver(IEmbeddingGenerator<string, Embedding<float>> generator, EmbeddingModelInfo model, ResolverOptions options, ResolverState state)
    {
        _generator = generator;
        _span = generator.GetService(typeof(ISpanEmbedder)) as ISpanEmbedder;
        _model = model;
        _options = options;
        _state = state;
    }

    /// <summary>The registry currently in force.</summary>
    public TaskRegistry Registry => Volatile.Read(ref _state).Registry;

    /// <summary>The embedding model's identity.</summary>
    public EmbeddingModelInfo Model => _model;

    /// <summary>The scoring strategy in force.</summary>
    public ScoringStrategy Scoring => Volatile.Read(ref _state).Scoring;

    /// <summary>
    /// Creates a resolver for <paramref name="registry"/>, embedding its approved and look-alike phrases with
    /// <paramref name="generator"/> (one batched call).
    /// </summary>
    /// <exception cref="ArgumentNullException">An argument is null.</exception>
    /// <exception cref="InvalidOperationException">The generator returned vectors of inconsistent width.</exception>
    public static async Task<TaskResolver> CreateAsync(TaskRegistry registry, IEmbeddingGenerator<string, Embedding<float>> generator,
        ResolverOptions? options = null, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(registry);
        ArgumentNullException.ThrowIfNull(generator);
        options = options?.Clone() ?? new ResolverOptions();
        var (model, state) = await BuildStateAsync(registry, generator, options, cancellationToken).ConfigureAwait(false);
        return new TaskResolver(generator, model, options, state);
    }

    /// <summary>Synchronous form of <see cref="CreateAsync"/>.</summary>
    public static TaskResolver Create(TaskRegistry registry, IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions? options = null)
        => CreateAsync(registry, generator, options).GetAwaiter().GetResult();

    /// <summary>
    /// Creates a resolver from precomputed embeddings (for example a compiled index): no model forward passes.
    /// </summary>
    /// <param name="registry">The registry the embeddings belong to.</param>
    /// <param name="generator">The generator for utterances; its model must be <paramref name="model"/>.</param>
    /// <param name="model">The model the embeddings were computed with.</param>
    /// <param name="phraseEmbeddings">One row per approved phrase (tasks in order, phrases in order), row-major.</param>
    /// <param name="mustRejectEmbeddings">One row per must_reject phrase, same order.</param>
    /// <param name="options">Settings; null for defaults.</param>
    /// <exception cref="InvalidOperationException">The generator's model differs from <paramref name="model"/>.</exception>
    public static TaskResolver FromEmbeddings(TaskRegistry registry, IEmbeddingGenerator<string, Embedding<float>> generator, EmbeddingModelInfo model,
        ReadOnlySpan<float> phraseEmbeddings, ReadOnlySpan<float> mustRejectEmbeddings, ResolverOptions? options = null)
        => FromEmbeddingsWithHead(registry, generator, model, phraseEmbeddings, mustRejectEmbeddings, options, head: null);

    private static TaskResolver FromEmbeddingsWithHead(TaskRegistry registry, IEmbeddingGenerator<string, Embedding<float>> generator, EmbeddingModelInfo model,
        ReadOnlySpan<float> phraseEmbeddings, ReadOnlySpan<float> mustRejectEmbeddings, ResolverOptions? options, TaskPhrase.Resolution.Scoring.TaskHead? head)
    {
        ArgumentNullException.ThrowIfNull(registry);
        ArgumentNullException.ThrowIfNull(generator);
        ArgumentNullException.ThrowIfNull(model);
        options = options?.Clone() ?? new ResolverOptions();
        if (generator.GetService(typeof(EmbeddingModelInfo)) is EmbeddingModelInfo live && (live.Sha256 != model.Sha256 || live.Dimensions != model.Dimensions))
            throw new InvalidOperationException($"The embeddings were computed with model '{model.Id}' (SHA-256 {model.Sha256}) but the generator runs '{live.Id}' (SHA-256 {live.Sha256}). Rebuild the index with this model.");
        var scoring = ChooseScoring(registry, options);
        var state = ResolverState.Build(registry, model, phraseEmbeddings, mustRejectEmbeddings, scoring, RegistryScoring.LearnedFor(registry, options),
            scoring == ScoringStrategy.Head ? head : null) with { TopK = RegistryScoring.TopKFor(registry, options) };
        return new TaskResolver(generator, model, options, state);
    }

    /// <summary>
    /// Creates a resolver from a compiled index (see <see cref="TaskIndexBuilder"/>): no model forward passes. A FiLM
    /// table stored in the index is attached.
    /// </summary>
    /// <exception cref="InvalidOperationException">The generator's model differs from the index's.</exception>
    /// <exception cref="InvalidDataException">A section of the index is malformed.</exception>
    public static TaskResolver FromIndex(TaskIndex index, IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(index);
        var rejects = ReadMustReject(index);
        // A head trained at build time is reused (no training at load); without one it is trained now.
        var head = index.Sections.TryGetValue(TaskIndexBuilder.HeadSection, out var headBytes) ? TaskPhrase.Resolution.Scoring.TaskHead.FromBytes(headBytes.Span) : null;
        var resolver = FromEmbeddingsWithHead(index.Registry, generator, index.Model, index.PhraseEmbeddings.Span, rejects, options, head);
        if (index.Sections.TryGetValue(TaskIndexBuilder.FilmSection, out var film))
        {
            var table = FilmTable.FromBytes(film.Span, null, $"{index.SourcePath} [film]");
            // A table that does not fit the registry is a malformed section (as documented), not a caller error.
            if (table.RowCount != index.PhraseCount || table.EmbeddingDimensions != index.Dimensions)
                throw new InvalidDataException($"{index.SourcePath}: the '{TaskIndexBuilder.FilmSection}' section holds {table.RowCount} rows of {table.EmbeddingDimensions}-dimensional input, but the index has {index.PhraseCount} phrases of {index.Dimensions} dimensions; rebuild it with 'taskphrase build'.");
            resolver.UseConditioning(table);
        }
        return resolver;
    }

    private static float[] ReadMustReject(TaskIndex index)
    {
        int expected = index.Registry.Tasks.Sum(t => t.MustReject.Count) * index.Dimensions;
        if (!index.Sections.TryGetValue(TaskIndexBuilder.MustRejectSection, out var bytes))
            return expected == 0 ? [] : throw new InvalidDataException($"{index.SourcePath}: index has no '{TaskIndexBuilder.MustRejectSection}' section but the registry lists look-alikes; rebuild it with 'taskphrase build'.");
        var floats = System.Runtime.InteropServices.MemoryMarshal.Cast<byte, float>(bytes.Span).ToArray();
        if (floats.Length != expected)
            throw new InvalidDataException($"{index.SourcePath}: '{TaskIndexBuilder.MustRejectSection}' section holds {floats.Length} values, expected {expected}; rebuild the index.");
        return floats;
    }

    /// <summary>Replaces the registry atomically (its phrases are embedded first); calls in flight finish on the old one.</summary>
    public async Task ReloadAsync(TaskRegistry registry, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(registry);
        var (_, state) = await BuildStateAsync(registry, _generator, _options, cancellationToken).ConfigureAwait(false);
        Volatile.Write(ref _state, WithFilm(state, _film));
    }

    /// <summary>
    /// Attaches a FiLM generator: the conditioning of every approved phrase is computed now (one matrix product per
    /// phrase) and accepted resolutions carry the vectors of their matched approved phrase. Kept across reloads.
    /// </summary>
    /// <exception cref="ArgumentException">The generator's input width differs from the model's.</exception>
    public void UseConditioning(FilmGenerator generator)
    {
        ArgumentNullException.ThrowIfNull(generator);
        if (generator.EmbeddingDimensions != _model.Dimensions)
            throw new ArgumentException($"The FiLM generator takes {generator.EmbeddingDimensions}-dimensional embeddings; the model gives {_model.Dimensions}.", nameof(generator));
        _film = generator;
        Volatile.Write(ref _state, WithFilm(Volatile.Read(ref _state), generator));
    }

    /// <summary>Attaches a precomputed conditioning table (for example from an index); it must have one row per approved phrase.</summary>
    /// <exception cref="ArgumentException">The table's row count or width does not fit the registry.</exception>
    public void UseConditioning(FilmTable table)
    {
        ArgumentNullException.ThrowIfNull(table);
        var state = Volatile.Read(ref _state);
        if (table.RowCount != state.PhraseTask.Length || table.EmbeddingDimensions != _model.Dimensions)
            throw new ArgumentException($"The FiLM table has {table.RowCount} rows of {table.EmbeddingDimensions}-dimensional input; the registry has {state.PhraseTask.Length} approved phrases and the model {_model.Dimensions} dimensions. Rebuild the index.", nameof(table));
        Volatile.Write(ref _state, state with { Film = table });
    }

    /// <summary>The conditioning table in force, if any.</summary>
    public FilmTable? Conditioning => Volatile.Read(ref _state).Film;

    private static ResolverState WithFilm(ResolverState state, FilmGenerator? generator)
        => generator is null ? state : state with { Film = FilmTable.Build(generator, state.Phrases, state.Dimensions) };

    /// <summary>Synchronous form of <see cref="ReloadAsync"/>.</summary>
    public void Reload(TaskRegistry registry, CancellationToken cancellationToken = default)
        => ReloadAsync(registry, cancellationToken).GetAwaiter().GetResult();

    /// <summary>
    /// Replaces the registry atomically with a compiled index: its embeddings, look-alikes, learned head and FiLM table
    /// are all read and checked first and swapped in one step; calls in flight finish on the old registry.
    /// </summary>
    /// <exception cref="InvalidOperationException">The index was built with another model.</exception>
    /// <exception cref="InvalidDataException">A section of the index is malformed (the old registry stays in force).</exception>
    public void Reload(TaskIndex index)
    {
        ArgumentNullException.ThrowIfNull(index);
        if (index.Model.Sha256 != _model.Sha256 || index.Model.Dimensions != _model.Dimensions)
            throw new InvalidOperationException($"The index was built with model '{index.Model.Id}' (SHA-256 {index.Model.Sha256}) but this resolver runs '{_model.Id}' (SHA-256 {_model.Sha256}). Rebuild the index with this model.");
        var rejects = ReadMustReject(index);
        var head = index.Sections.TryGetValue(TaskIndexBuilder.HeadSection, out var headBytes) ? TaskPhrase.Resolution.Scoring.TaskHead.FromBytes(headBytes.Span) : null;
        var film = index.Sections.TryGetValue(TaskIndexBuilder.FilmSection, out var filmBytes) ? FilmTable.FromBytes(filmBytes.Span, null, $"{index.SourcePath} [film]") : null;
        var scoring = ChooseScoring(index.Registry, _options);
        var state = ResolverState.Build(index.Registry, _model, index.PhraseEmbeddings.Span, rejects, scoring, RegistryScoring.LearnedFor(index.Registry, _options), scoring == ScoringStrategy.Head ? head : null)
            with { TopK = RegistryScoring.TopKFor(index.Registry, _options) };
        Volatile.Write(ref _state, film is not null ? state with { Film = film } : WithFilm(state, _film));
    }

    /// <summary>Replaces the registry atomically with precomputed embeddings (see <see cref="FromEmbeddings"/>).</summary>
    public void Reload(TaskRegistry registry, ReadOnlySpan<float> phraseEmbeddings, ReadOnlySpan<float> mustRejectEmbeddings)
    {
        ArgumentNullException.ThrowIfNull(registry);
        var state = ResolverState.Build(registry, _model, phraseEmbeddings, mustRejectEmbeddings, ChooseScoring(registry, _options), RegistryScoring.LearnedFor(registry, _options))
            with { TopK = RegistryScoring.TopKFor(registry, _options) };
        Volatile.Write(ref _state, WithFilm(state, _film));
    }

    /// <summary>Resolves one utterance.</summary>
    /// <exception cref="ArgumentNullException"><paramref name="utterance"/> is null.</exception>
    public Resolution Resolve(string utterance)
    {
        ArgumentNullException.ThrowIfNull(utterance);
        var state = Volatile.Read(ref _state);
        long start = Stopwatch.GetTimestamp();
        var prepared = Prepare(state, utterance);
        if (prepared.Early is { } early) return early.StampElapsed(Stopwatch.GetElapsedTime(start));
        Span<float> vector = state.Dimensions <= MaxStackDimensions ? stackalloc float[state.Dimensions] : new float[state.Dimensions];
        bool truncated = EmbedOne(prepared.Text, vector);
        var result = Decide(state, prepared, vector, truncated);
        if (ProposeRetry(state, prepared, result) is { } retry)
            result = KeepIfClear(state, prepared, result, retry, ResolveRetry(state, retry));
        return result.StampElapsed(Stopwatch.GetElapsedTime(start));
    }

    /// <summary>Resolves one utterance; the embedding call is awaited (useful with remote generators).</summary>
    public async Task<Resolution> ResolveAsync(string utterance, CancellationToken cancellationToken = default)
    {
        var results = await ResolveManyAsync([utterance ?? throw new ArgumentNullException(nameof(utterance))], cancellationToken).ConfigureAwait(false);
        return results[0];
    }

    /// <summary>Resolves many utterances with batched embedding; results are in input order.</summary>
    public IReadOnlyList<Resolution> ResolveMany(IReadOnlyList<string> utterances, CancellationToken cancellationToken = default)
        => ResolveManyAsync(utterances, cancellationToken).GetAwaiter().GetResult();

    /// <summary>Resolves many utterances with batched embedding; results are in input order.</summary>
    public async Task<IReadOnlyList<Resolution>> ResolveManyAsync(IReadOnlyList<string> utterances, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(utterances);
        var state = Volatile.Read(ref _state);
        long start = Stopwatch.GetTimestamp();
        var results = new Resolution[utterances.Count];
        var prepared = new Prepared[utterances.Count];
        for (int i = 0; i < utterances.Count; i++)
            prepared[i] = Prepare(state, utterances[i] ?? throw new ArgumentException($"Utterance {i} is null.", nameof(utterances)));
        var embedded = await DecideAllAsync(state, prepared, results, cancellationToken).ConfigureAwait(false);
        if (embedded.Count > 0) await RetryOutOfScopeAsync(state, prepared, results, embedded, cancellationToken).ConfigureAwait(false);
        var elapsed = Stopwatch.GetElapsedTime(start) / Math.Max(1, utterances.Count);
        for (int i = 0; i < results.Length; i++) results[i].StampElapsed(elapsed);
        return results;
    }

    /// <summary>
    /// Fills <paramref name="results"/> for <paramref name="prepared"/>: early resolutions as they are, the others decided
    /// on embeddings made in one batched call. Returns the positions that were embedded.
    /// </summary>
    private async Task<List<int>> DecideAllAsync(ResolverState state, Prepared[] prepared, Resolution[] results, CancellationToken cancellationToken)
    {
        var toEmbed = new List<int>();
        for (int i = 0; i < prepared.Length; i++)
        {
            if (prepared[i].Early is { } early) results[i] = early;
            else toEmbed.Add(i);
        }
        if (toEmbed.Count == 0) return toEmbed;
        var embeddings = await _generator.GenerateAsync(toEmbed.Select(i => prepared[i].Text).ToList(), null, cancellationToken).ConfigureAwait(false);
        for (int k = 0; k < toEmbed.Count; k++)
        {
            int i = toEmbed[k];
            var e = embeddings[k];
            CheckWidth(e.Vector.Length, state.Dimensions);
            bool truncated = e.AdditionalProperties?.TryGetValue("truncated", out var t) == true && t is true;
            results[i] = Decide(state, prepared[i], e.Vector.Span, truncated);
        }
        return toEmbed;
    }

    /// <summary>
    /// Scores every task for <paramref name="utterance"/> and returns the top <paramref name="count"/> candidates,
    /// best first, without any decision (no thresholds, no guards).
    /// </summary>
    public IReadOnlyList<TaskCandidate> Rank(string utterance, int count = 5)
    {
        ArgumentNullException.ThrowIfNull(utterance);
        ArgumentOutOfRangeException.ThrowIfLessThan(count, 1);
        var state = Volatile.Read(ref _state);
        Span<float> vector = state.Dimensions <= MaxStackDimensions ? stackalloc float[state.Dimensions] : new float[state.Dimensions];
        EmbedOne(Text.TextNormalizer.Normalize(utterance), vector);
        return RankCandidates(state, vector, count);
    }

    private bool EmbedOne(string text, Span<float> destination)
    {
        if (_span is not null) return _span.Embed(text, destination);
        var result = _generator.GenerateAsync([text]).GetAwaiter().GetResult();
        var vector = result[0].Vector.Span;
        CheckWidth(vector.Length, destination.Length);
        vector.CopyTo(destination);
        return result[0].AdditionalProperties?.TryGetValue("truncated", out var t) == true && t is true;
    }

    private static void CheckWidth(int actual, int expected)
    {
        if (actual != expected)
            throw new InvalidOperationException($"The embedding generator returned a vector of {actual} dimensions; the registry's embeddings have {expected}.");
    }

    private static ScoringStrategy ChooseScoring(TaskRegistry registry, ResolverOptions options)
    {
        if (options.Scoring is { } chosen) return chosen;
        return registry.Settings.Scoring switch
        {
            null or "" => ResolverOptions.DefaultScoring,
            "best-phrase" => ScoringStrategy.BestPhrase,
            "centroid" => ScoringStrategy.Centroid,
            "top-k" => ScoringStrategy.TopK,
            "blend" => ScoringStrategy.Blend,
            "whitened" => ScoringStrategy.Whitened,
            "head" => ScoringStrategy.Head,
            var other => throw new ArgumentException($"Unknown scoring strategy '{other}' in the registry; use best-phrase, centroid, top-k, blend, whitened or head."),
        };
    }

    private static async Task<(EmbeddingModelInfo, ResolverState)> BuildStateAsync(TaskRegistry registry,
        IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions options, CancellationToken ct)
    {
        var texts = registry.Tasks.SelectMany(t => t.Phrases).Concat(registry.Tasks.SelectMany(t => t.MustReject)).ToList();
        var embeddings = await generator.GenerateAsync(texts, null, ct).ConfigureAwait(false);
        if (embeddings.Count != texts.Count)
            throw new InvalidOperationException($"The embedding generator returned {embeddings.Count} vectors for {texts.Count} texts.");
        int dims = embeddings.Count > 0 ? embeddings[0].Vector.Length : 0;
        var model = generator.GetService(typeof(EmbeddingModelInfo)) as EmbeddingModelInfo
                    ?? new EmbeddingModelInfo(
                        (generator.GetService(typeof(EmbeddingGeneratorMetadata)) as EmbeddingGeneratorMetadata)?.DefaultModelId ?? "unknown",
                        "unknown", dims, 0, "unknown");
        int phraseCount = registry.Tasks.Sum(t => t.Phrases.Count);
        var phrases = new float[phraseCount * model.Dimensions];
        var rejects = new float[(texts.Count - phraseCount) * model.Dimensions];
        for (int i = 0; i < texts.Count; i++)
        {
            var v = embeddings[i].Vector.Span;
            CheckWidth(v.Length, model.Dimensions);
            v.CopyTo(i < phraseCount ? phrases.AsSpan(i * model.Dimensions) : rejects.AsSpan((i - phraseCount) * model.Dimensions));
        }
        return (model, ResolverState.Build(registry, model, phrases, rejects, ChooseScoring(registry, options), RegistryScoring.LearnedFor(registry, options))
            with { TopK = RegistryScoring.TopKFor(registry, options) });
    }
}
