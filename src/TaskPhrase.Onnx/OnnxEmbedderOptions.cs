namespace TaskPhrase.Onnx;

/// <summary>Settings of an <see cref="OnnxEmbedder"/>. Validated when set.</summary>
public sealed class OnnxEmbedderOptions
{
    private int _intraOpThreads = 2;
    private int _batchSize = 32;
    private int _quantizedIntraOpThreads = 1;
    private int _quantizedBatchSize = 128;
    private int _parallelBatches = 1;
    private int _quantizedParallelBatches;

    /// <summary>
    /// ONNX Runtime intra-op threads (default 2, measured best for single commands on a 2-core machine).
    /// 0 lets ONNX Runtime choose.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Negative or above 256.</exception>
    public int IntraOpThreads
    {
        get => _intraOpThreads;
        set { ArgumentOutOfRangeException.ThrowIfNegative(value); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 256); _intraOpThreads = value; }
    }

    /// <summary>
    /// Intra-op threads for int8 models (cards with a <c>quantization</c> section), used instead of
    /// <see cref="IntraOpThreads"/> (default 1: an int8 single command is short enough that a second thread costs
    /// more in hand-over than it saves; see docs/int8.md). 0 means use <see cref="IntraOpThreads"/>.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Negative or above 256.</exception>
    public int QuantizedIntraOpThreads
    {
        get => _quantizedIntraOpThreads;
        set { ArgumentOutOfRangeException.ThrowIfNegative(value); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 256); _quantizedIntraOpThreads = value; }
    }

    /// <summary>
    /// Whether ONNX Runtime's worker threads spin while waiting (default false: spinning degrades badly when
    /// other processes compete for the cores, and costs little on a quiet machine).
    /// </summary>
    public bool AllowSpinning { get; set; }

    /// <summary>
    /// Most texts per forward pass when embedding many (default 32; texts are sorted by length first; int8 models
    /// batch only texts of equal token length, see <see cref="OnnxEmbedder.EmbedMany"/>).
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Below 1 or above 1024.</exception>
    public int BatchSize
    {
        get => _batchSize;
        set { ArgumentOutOfRangeException.ThrowIfLessThan(value, 1); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 1024); _batchSize = value; }
    }

    /// <summary>
    /// Most texts per forward pass when an int8 model (a card with a <c>quantization</c> section) embeds many, used
    /// instead of <see cref="BatchSize"/> (default 128: int8 batches hold texts of one token length only, and on the
    /// benchmark machine 1,000 phrases embedded 1.20× faster at 128 than at 32 with int8, while fp32 gained nothing
    /// past 32; docs/int8.md). 0 means use <see cref="BatchSize"/>.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Negative or above 1024.</exception>
    public int QuantizedBatchSize
    {
        get => _quantizedBatchSize;
        set { ArgumentOutOfRangeException.ThrowIfNegative(value); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 1024); _quantizedBatchSize = value; }
    }

    /// <summary>
    /// How many batches <see cref="OnnxEmbedder.EmbedMany"/> runs side by side on the one session (default 1: one
    /// after the other). Each concurrent forward pass uses its own <see cref="IntraOpThreads"/>, so on a machine with
    /// C cores, ParallelBatches × IntraOpThreads ≤ C avoids oversubscription. Results do not depend on it.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Below 1 or above 64.</exception>
    public int ParallelBatches
    {
        get => _parallelBatches;
        set { ArgumentOutOfRangeException.ThrowIfLessThan(value, 1); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 64); _parallelBatches = value; }
    }

    /// <summary>
    /// <see cref="ParallelBatches"/> for int8 models, used instead of it (default 0: use <see cref="ParallelBatches"/>).
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Negative or above 64.</exception>
    public int QuantizedParallelBatches
    {
        get => _quantizedParallelBatches;
        set { ArgumentOutOfRangeException.ThrowIfNegative(value); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 64); _quantizedParallelBatches = value; }
    }

    /// <summary>Check model.onnx against the SHA-256 in the model card at load (default true; hashing runs beside session creation).</summary>
    public bool VerifyModelHash { get; set; } = true;

    /// <summary>
    /// Create the session from the model directory's mapped form (<c>model.mapped.onnx</c> and its weights file, see
    /// <see cref="OnnxEmbedder.PrepareOptimizedModel"/>) when it is there and still fits model.onnx (default true: the
    /// weights are mapped into memory instead of copied, so start-up is shorter and peak memory lower; the embeddings
    /// are bit-identical). Otherwise model.onnx is used.
    /// </summary>
    public bool UseOptimizedModel { get; set; } = true;

    /// <summary>
    /// Settings for embedding many texts at once (index builds, audits, tuning) on a machine with
    /// <paramref name="processorCount"/> logical CPUs (default <see cref="Environment.ProcessorCount"/>): up to four
    /// batches side by side, each forward pass with the remaining share of the CPUs as intra-op threads (on 2 CPUs:
    /// 2 batches × 1 thread), for fp32 and int8 models alike. On the 2-core benchmark machine this built a
    /// 1,000-phrase index 1.3× faster than one batch at a time with 2 threads for fp32, and 1.6× faster than one
    /// batch at 1 thread for int8 (docs/benchmarks.md). Single commands are better served by the defaults.
    /// </summary>
    /// <param name="processorCount">Logical CPUs to plan for; null for this machine's.</param>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="processorCount"/> is below 1.</exception>
    public static OnnxEmbedderOptions ForBatchWork(int? processorCount = null)
    {
        int cpus = processorCount ?? Environment.ProcessorCount;
        ArgumentOutOfRangeException.ThrowIfLessThan(cpus, 1, nameof(processorCount));
        int parallel = Math.Min(cpus, 4);
        int threads = Math.Min(256, Math.Max(1, cpus / parallel));
        return new OnnxEmbedderOptions { IntraOpThreads = threads, QuantizedIntraOpThreads = threads, ParallelBatches = parallel };
    }

    /// <summary>Last changes to ONNX Runtime's session settings (benchmarks turn the profiler on with it).</summary>
    internal Action<Microsoft.ML.OnnxRuntime.SessionOptions>? ConfigureSession { get; set; }

    /// <summary>A copy with the same settings.</summary>
    internal OnnxEmbedderOptions Clone() => (OnnxEmbedderOptions)MemberwiseClone();
}
