using System.Numerics.Tensors;
using Microsoft.Extensions.AI;
using Microsoft.ML.OnnxRuntime;
using TaskPhrase.Embedding;

namespace TaskPhrase.Onnx;

/// <summary>
/// A sentence embedder on ONNX Runtime (CPU): WordPiece tokenisation, one forward pass, masked mean
/// (or CLS) pooling and L2 normalisation. Implements <see cref="IEmbeddingGenerator{TInput, TEmbedding}"/>
/// so any .NET AI code can use it, and <see cref="ISpanEmbedder"/> for the allocation-free path.
/// </summary>
/// <remarks>
/// One <see cref="InferenceSession"/> per instance, shared by all threads: every member is thread-safe.
/// The instance owns native resources; dispose it when done. Calls after <see cref="Dispose"/> throw
/// <see cref="ObjectDisposedException"/>; calls in flight when it is disposed finish first.
/// </remarks>
public sealed partial class OnnxEmbedder : IEmbeddingGenerator<string, Embedding<float>>, ISpanEmbedder
{
    private readonly InferenceSession _session;
    private readonly WordPieceTokenizer _tokenizer;
    private readonly ModelCard _card;
    private readonly OnnxEmbedderOptions _options;
    private readonly string[] _outputNames;
    private readonly bool _needsTokenTypes;
    private readonly EmbeddingGeneratorMetadata _metadata;
    private readonly ReaderWriterLockSlim _lifetime = new(LockRecursionPolicy.SupportsRecursion);
    private bool _disposed;

    /// <summary>Identity of the loaded model (id, SHA-256 of model.onnx, dimensions, token limit, pooling).</summary>
    public EmbeddingModelInfo Model { get; }

    /// <summary>The tokenizer (the quantiser feeds its calibration copy of the model with it).</summary>
    internal WordPieceTokenizer Tokenizer => _tokenizer;

    /// <summary>
    /// Whether the session was created from the directory's mapped form (<c>model.mapped.onnx</c> with its weights file,
    /// written by <see cref="PrepareOptimizedModel"/>) rather than from model.onnx; the embeddings are the same either way.
    /// </summary>
    public bool UsesOptimizedModel { get; private init; }

    /// <summary>Why the mapped form was not used (missing, stale, damaged, turned off, …); empty when it was.</summary>
    public string OptimizedModelNote { get; private init; } = "";

    /// <summary>The model directory this embedder was loaded from.</summary>
    public string ModelDirectory { get; }

    /// <inheritdoc />
    public bool Embed(string text, Span<float> destination)
    {
        ArgumentNullException.ThrowIfNull(text);
        if (destination.Length != Model.Dimensions)
            throw new ArgumentException($"Destination has {destination.Length} elements; the model gives {Model.Dimensions}.", nameof(destination));
        EnterCall();
        var scratch = RentScratch();
        try
        {
            var (count, truncated) = _tokenizer.Encode(text, scratch.Ids, scratch.Mask);
            _session.RunWithBinding(scratch.RunOptions, scratch.Bind(count));
            PoolAndNormalize(scratch.Hidden.AsSpan(0, count * Model.Dimensions), scratch.Mask.AsSpan(0, count), 1, count, destination);
            return truncated;
        }
        finally
        {
            ReturnScratch(scratch);
            ExitCall();
        }
    }

    /// <inheritdoc />
    public SubwordStatistics Analyze(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        EnterCall();
        try { return _tokenizer.Analyze(text, Model.MaxTokens); }
        finally { ExitCall(); }
    }

    /// <summary>
    /// Embeds many texts. Texts are sorted by token length and run in batches of up to
    /// <see cref="OnnxEmbedderOptions.BatchSize"/> (<see cref="OnnxEmbedderOptions.QuantizedBatchSize"/> for int8), each padded to its longest member; results come back
    /// in input order. For fp32 models they equal one-at-a-time results within float rounding. For int8 models
    /// (cards with a <c>quantization</c> section) a batch holds only texts of one token length: padding rows
    /// widen the per-tensor activation ranges of the int8 MatMuls and shift the embeddings (min cosine to fp32
    /// 0.9875 padded against 0.9926 length-bucketed over 701 phrases, docs/int8.md); texts of one length still share those ranges, so
    /// int8 batch results are close to, not equal to, one-at-a-time results.
    /// </summary>
    /// <param name="texts">The texts.</param>
    /// <param name="cancellationToken">Checked between batches.</param>
    /// <returns>One L2-normalised vector per text, and per text whether it was truncated.</returns>
    public (float[][] Vectors, bool[] Truncated) EmbedMany(IReadOnlyList<string> texts, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(texts);
        EnterCall();
        try
        {
            int n = texts.Count, limit = Model.MaxTokens, dims = Model.Dimensions;
            var tokenIds = new long[n][];
            var counts = new int[n];
            var truncated = new bool[n];
            var scratchIds = new long[limit];
            var scratchMask = new long[limit];
            for (int i = 0; i < n; i++)
            {
                string text = texts[i] ?? throw new ArgumentException($"Text {i} is null.", nameof(texts));
                (counts[i], truncated[i]) = _tokenizer.Encode(text, scratchIds, scratchMask);
                tokenIds[i] = scratchIds[..counts[i]];
            }
            var order = Enumerable.Range(0, n).OrderBy(i => counts[i]).ThenBy(i => i).ToArray();
            var vectors = new float[n][];
            bool bucketByLength = _card.IsQuantized;
            int batch = bucketByLength && _options.QuantizedBatchSize > 0 ? _options.QuantizedBatchSize : _options.BatchSize;
            // Cut the length-sorted order into batches first, so that they can run one after the other or side by side.
            var batches = new List<(int Start, int Size)>();
            for (int start = 0, size; start < n; start += size)
            {
                size = Math.Min(batch, n - start);
                if (bucketByLength)
                {
                    // order is sorted by length: cut the batch where the length changes.
                    int length = counts[order[start]];
                    for (int k = 1; k < size; k++)
                        if (counts[order[start + k]] != length) { size = k; break; }
                }
                batches.Add((start, size));
            }
            void Run((int Start, int Size) b)
            {
                var (start, size) = b;
                int width = 0;
                for (int k = 0; k < size; k++) width = Math.Max(width, counts[order[start + k]]);
                var ids = new long[size * width];
                var mask = new long[size * width];
                for (int k = 0; k < size; k++)
                {
                    int i = order[start + k];
                    tokenIds[i].CopyTo(ids, k * width);
                    mask.AsSpan(k * width, counts[i]).Fill(1);
                }
                var output = new float[size * dims];
                RunBatch(ids, mask, size, width, output);
                for (int k = 0; k < size; k++) vectors[order[start + k]] = output.AsSpan(k * dims, dims).ToArray();
            }
            int workers = Math.Min(ParallelBatchesFor(_card, _options), batches.Count);
            if (workers <= 1)
            {
                foreach (var b in batches)
                {
                    cancellationToken.ThrowIfCancellationRequested();
                    Run(b);
                }
            }
            else
            {
                // Longest batches first, so that the workers finish together.
                batches.Sort((x, y) => (counts[order[y.Start + y.Size - 1]] * y.Size).CompareTo(counts[order[x.Start + x.Size - 1]] * x.Size));
                try
                {
                    Parallel.ForEach(batches, new ParallelOptions { MaxDegreeOfParallelism = workers, CancellationToken = cancellationToken }, Run);
                }
                catch (AggregateException e) when (e.InnerExceptions.Count >= 1)
                {
                    System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(e.InnerExceptions[0]).Throw();
                }
            }
            return (vectors, truncated);
        }
        finally { ExitCall(); }
    }

    /// <inheritdoc />
    public Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values, EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(values);
        var list = values as IReadOnlyList<string> ?? values.ToList();
        var (vectors, truncated) = EmbedMany(list, cancellationToken);
        var result = new GeneratedEmbeddings<Embedding<float>>(vectors.Length);
        var created = DateTimeOffset.UtcNow;
        for (int i = 0; i < vectors.Length; i++)
        {
            var e = new Embedding<float>(vectors[i]) { ModelId = Model.Id, CreatedAt = created };
            if (truncated[i]) e.AdditionalProperties = new AdditionalPropertiesDictionary { [TruncatedProperty] = true };
            result.Add(e);
        }
        return Task.FromResult(result);
    }

    /// <summary>Key of <c>Embedding.AdditionalProperties</c> set to <c>true</c> when an input was truncated.</summary>
    public const string TruncatedProperty = "truncated";

    /// <inheritdoc />
    public object? GetService(Type serviceType, object? serviceKey = null)
    {
        ArgumentNullException.ThrowIfNull(serviceType);
        if (serviceKey is not null) return null;
        if (serviceType == typeof(EmbeddingGeneratorMetadata)) return _metadata;
        if (serviceType == typeof(EmbeddingModelInfo)) return Model;
        if (serviceType.IsInstanceOfType(this)) return this;
        return null;
    }

    /// <summary>
    /// Releases the ONNX Runtime session. Waits for calls in flight; later calls throw
    /// <see cref="ObjectDisposedException"/>.
    /// </summary>
    public void Dispose()
    {
        _lifetime.EnterWriteLock();
        try
        {
            if (_disposed) return;
            _disposed = true;
            DisposeScratch();
            _session.Dispose();
        }
        finally { _lifetime.ExitWriteLock(); }
    }

    /// <summary>The session, for benchmarks that time a bare forward pass on the very same session.</summary>
    internal InferenceSession Session => _session;

    private void EnterCall()
    {
        _lifetime.EnterReadLock();
        if (_disposed)
        {
            _lifetime.ExitReadLock();
            throw new ObjectDisposedException(nameof(OnnxEmbedder), $"The embedder for model '{Model.Id}' has been disposed.");
        }
    }

    private void ExitCall() => _lifetime.ExitReadLock();

    /// <summary>How many batches <see cref="EmbedMany"/> runs side by side for this model.</summary>
    internal static int ParallelBatchesFor(ModelCard card, OnnxEmbedderOptions options) =>
        card.IsQuantized && options.QuantizedParallelBatches > 0 ? options.QuantizedParallelBatches : options.ParallelBatches;

    /// <summary>Runs one padded batch [size, width] and writes pooled, normalised vectors to <paramref name="destination"/>.</summary>
    private void RunBatch(long[] ids, long[] mask, int size, int width, Span<float> destination)
    {
        long[] shape = [size, width];
        int cells = size * width;
        using var idsValue = OrtValue.CreateTensorValueFromMemory(OrtMemoryInfo.DefaultInstance, ids.AsMemory(0, cells), shape);
        using var maskValue = OrtValue.CreateTensorValueFromMemory(OrtMemoryInfo.DefaultInstance, mask.AsMemory(0, cells), shape);
        OrtValue? typesValue = _needsTokenTypes
            ? OrtValue.CreateTensorValueFromMemory(OrtMemoryInfo.DefaultInstance, new long[cells].AsMemory(), shape)
            : null;
        try
        {
            var names = _needsTokenTypes ? InputNamesWithTypes : InputNames;
            OrtValue[] inputs = typesValue is null ? [idsValue, maskValue] : [idsValue, maskValue, typesValue];
            using var runOptions = new RunOptions();
            using var outputs = _session.Run(runOptions, names, inputs, _outputNames);
            PoolAndNormalize(outputs[0].GetTensorDataAsSpan<float>(), mask, size, width, destination);
        }
        finally { typesValue?.Dispose(); }
    }

    /// <summary>Pools each of the <paramref name="size"/> rows of the hidden state [size, width, dimensions] and L2-normalises it into <paramref name="destination"/>.</summary>
    private void PoolAndNormalize(ReadOnlySpan<float> hidden, ReadOnlySpan<long> mask, int size, int width, Span<float> destination)
    {
        int dims = Model.Dimensions;
        for (int b = 0; b < size; b++)
        {
            var target = destination.Slice(b * dims, dims);
            Pool(hidden.Slice(b * width * dims, width * dims), mask.Slice(b * width, width), dims, target);
            float norm = TensorPrimitives.Norm(target);
            if (norm > 0) TensorPrimitives.Divide(target, norm, target);
        }
    }

    private void Pool(ReadOnlySpan<float> hidden, ReadOnlySpan<long> mask, int dims, Span<float> target)
    {
        if (_card.Pooling == "cls")
        {
            hidden[..dims].CopyTo(target);
            return;
        }
        target.Clear();
        int tokens = 0;
        for (int t = 0; t < mask.Length; t++)
        {
            if (mask[t] == 0) continue;
            TensorPrimitives.Add(target, hidden.Slice(t * dims, dims), target);
            tokens++;
        }
        if (tokens > 0) TensorPrimitives.Divide(target, tokens, target);
    }

    private static readonly string[] InputNames = ["input_ids", "attention_mask"];
    private static readonly string[] InputNamesWithTypes = ["input_ids", "attention_mask", "token_type_ids"];
}
