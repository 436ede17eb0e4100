using Microsoft.ML.OnnxRuntime;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// The baseline every model-path figure is compared with: one bare ONNX Runtime forward pass of a fixed,
/// already tokenised input. Either on the embedder's own session (<see cref="Onnx.OnnxEmbedder"/>'s, so the very
/// same thread pool and settings: the fair baseline), or on a session of its own made with the same options as the
/// embedder's (all graph optimisations, sequential execution, the given intra-op threads, one inter-op thread,
/// spinning as given). Inputs and the output are made once over preallocated arrays and passed to
/// <see cref="InferenceSession.Run(RunOptions, IReadOnlyCollection{string}, IReadOnlyCollection{OrtValue}, IReadOnlyCollection{string}, IReadOnlyCollection{OrtValue})"/>,
/// so a call is ONNX Runtime's work and nothing else. Not thread-safe (one set of buffers).
/// </summary>
internal sealed class RawForward : IDisposable
{
    private readonly InferenceSession _session;
    private readonly RunOptions _runOptions = new();
    private readonly string[] _inputNames;
    private readonly OrtValue[] _inputs;
    private readonly string[] _outputNames;
    private readonly OrtValue[] _outputs;
    private readonly float[] _hidden;

    private readonly bool _ownsSession;

    /// <summary>A baseline on a session of its own, made with the embedder's options.</summary>
    public RawForward(string modelPath, ReadOnlySpan<long> tokenIds, int intraOpThreads, bool allowSpinning)
        : this(CreateSession(modelPath, intraOpThreads, allowSpinning), ownsSession: true, tokenIds)
    {
    }

    /// <summary>A baseline on an existing session (not disposed here).</summary>
    public RawForward(InferenceSession session, ReadOnlySpan<long> tokenIds)
        : this(session, ownsSession: false, tokenIds)
    {
    }

    private RawForward(InferenceSession session, bool ownsSession, ReadOnlySpan<long> tokenIds)
    {
        _session = session;
        _ownsSession = ownsSession;
        int count = tokenIds.Length;
        long[] shape = [1, count];
        long[] ids = tokenIds.ToArray();
        long[] mask = Enumerable.Repeat(1L, count).ToArray();
        long[] types = new long[count];
        bool needsTypes = _session.InputMetadata.ContainsKey("token_type_ids");
        _inputNames = needsTypes ? ["input_ids", "attention_mask", "token_type_ids"] : ["input_ids", "attention_mask"];
        var values = new List<OrtValue>
        {
            OrtValue.CreateTensorValueFromMemory(ids, shape),
            OrtValue.CreateTensorValueFromMemory(mask, shape),
        };
        if (needsTypes) values.Add(OrtValue.CreateTensorValueFromMemory(types, shape));
        _inputs = [.. values];

        _outputNames = ["last_hidden_state"];
        Dimensions = _session.OutputMetadata["last_hidden_state"].Dimensions[^1];
        _hidden = new float[count * Dimensions];
        _outputs = [OrtValue.CreateTensorValueFromMemory(_hidden, [1, count, Dimensions])];
        TokenCount = count;
    }

    /// <summary>Tokens in the bound input ([CLS] and [SEP] included).</summary>
    public int TokenCount { get; }

    /// <summary>Width of the model's hidden state.</summary>
    public int Dimensions { get; }

    /// <summary>Runs one forward pass; returns the first hidden value so the work cannot be optimised away.</summary>
    public float Run()
    {
        _session.Run(_runOptions, _inputNames, _inputs, _outputNames, _outputs);
        return _hidden[0];
    }

    public void Dispose()
    {
        foreach (var v in _inputs) v.Dispose();
        foreach (var v in _outputs) v.Dispose();
        _runOptions.Dispose();
        if (_ownsSession) _session.Dispose();
    }

    private static InferenceSession CreateSession(string modelPath, int intraOpThreads, bool allowSpinning)
    {
        using var options = new SessionOptions
        {
            GraphOptimizationLevel = GraphOptimizationLevel.ORT_ENABLE_ALL,
            ExecutionMode = ExecutionMode.ORT_SEQUENTIAL,
            IntraOpNumThreads = intraOpThreads,
            InterOpNumThreads = 1,
        };
        options.AddSessionConfigEntry("session.intra_op.allow_spinning", allowSpinning ? "1" : "0");
        return new InferenceSession(modelPath, options);
    }
}
