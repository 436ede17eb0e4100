namespace TaskPhrase.Onnx.Quantization;

/// <summary>Settings of <see cref="ModelQuantizer"/>. Validated when set.</summary>
public sealed class QuantizationOptions
{
    private double _alpha = 0.7;
    private string? _id;

    /// <summary>
    /// SmoothQuant migration strength α in [0, 1] (default 0.7): per input channel j the activation is divided and the
    /// weight row multiplied by s_j = max|X_j|^α / max|W_j|^(1−α).
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Outside [0, 1] or not a number.</exception>
    public double Alpha
    {
        get => _alpha;
        set
        {
            if (!(value >= 0 && value <= 1)) throw new ArgumentOutOfRangeException(nameof(value), value, "Alpha must be between 0 and 1.");
            _alpha = value;
        }
    }

    /// <summary>Id of the int8 model (default: the source id with <c>-int8</c> appended).</summary>
    /// <exception cref="ArgumentException">Empty or whitespace.</exception>
    public string? Id
    {
        get => _id;
        set
        {
            if (value is not null && string.IsNullOrWhiteSpace(value)) throw new ArgumentException("The model id must not be empty.", nameof(value));
            _id = value;
        }
    }

    /// <summary>
    /// The CLINC150 <c>clinc150_train_val.json</c> (or its folder) for the CLINC150 gate: when set, both models are
    /// audited on its validation split at fp32's tuned operating point, the figures go into the card and each rate must
    /// be within <see cref="QuantizationGates.Clinc150Points"/> of fp32's. Null (default): no CLINC150 gate.
    /// </summary>
    public string? Clinc150Path { get; init; }

    /// <summary>
    /// Measurements only: a per-group plan replacing the method's (<see cref="ModelQuantizer.DefaultPlan"/>), with the
    /// variant's name appended to the recorded method (<c>method+name</c>) so that its card never passes for the method's.
    /// </summary>
    internal (string Name, Func<IReadOnlyList<ModelQuantizer.MatMulGroup>, int, ModelQuantizer.GroupPlan> Plan)? Variant { get; init; }

    /// <summary>Measurements only: calibration phrases replacing <see cref="QuantizationPhrases.Calibration"/>.</summary>
    internal IReadOnlyList<string>? CalibrationPhrases { get; init; }

    /// <summary>Runtime settings for the sessions that calibrate and evaluate (default: 1 intra-op thread, which also keeps calibration exactly repeatable).</summary>
    public OnnxEmbedderOptions EmbedderOptions { get; init; } = new() { IntraOpThreads = 1, QuantizedIntraOpThreads = 1 };
}
