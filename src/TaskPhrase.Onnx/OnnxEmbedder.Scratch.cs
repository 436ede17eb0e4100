using System.Runtime.InteropServices;
using Microsoft.ML.OnnxRuntime;

namespace TaskPhrase.Onnx;

public sealed partial class OnnxEmbedder
{
    private Scratch?[]? _scratchPool;

    /// <summary>
    /// Takes a set of single-text buffers from the pool, or makes one when every pooled set is in use (more threads
    /// embedding at once than the pool holds). Lock-free; allocation-free once the pool is warm.
    /// </summary>
    private Scratch RentScratch()
    {
        var pool = Volatile.Read(ref _scratchPool) ?? InitializePool();
        for (int i = 0; i < pool.Length; i++)
        {
            if (Interlocked.Exchange(ref pool[i], null) is { } scratch) return scratch;
        }
        return new Scratch(_session, Model.MaxTokens, Model.Dimensions, _needsTokenTypes, _outputNames[0]);
    }

    /// <summary>Puts <paramref name="scratch"/> back, or disposes it when the pool is full.</summary>
    private void ReturnScratch(Scratch scratch)
    {
        var pool = _scratchPool!;
        for (int i = 0; i < pool.Length; i++)
        {
            if (Interlocked.CompareExchange(ref pool[i], scratch, null) is null) return;
        }
        scratch.Dispose();
    }

    private Scratch?[] InitializePool()
    {
        Interlocked.CompareExchange(ref _scratchPool, new Scratch?[Math.Max(2, Environment.ProcessorCount)], null);
        return _scratchPool;
    }

    /// <summary>Disposes the pooled buffers' native values. Only called under the write lock, with no call in flight.</summary>
    private void DisposeScratch()
    {
        if (_scratchPool is not { } pool) return;
        for (int i = 0; i < pool.Length; i++) Interlocked.Exchange(ref pool[i], null)?.Dispose();
    }

    /// <summary>
    /// The buffers of one single-text forward pass: token ids, attention mask, token types (zeros) and the hidden
    /// state, each allocated once on the pinned object heap at the model's token limit, with run options and, per
    /// token count, an I/O binding of ONNX Runtime values that view them, made on first use and kept. A pass then
    /// runs straight from and into these arrays: no managed or native buffers are made per call. Used by one call at a time.
    /// </summary>
    private sealed class Scratch : IDisposable
    {
        private readonly InferenceSession _session;
        private readonly int _dimensions;
        private readonly bool _needsTokenTypes;
        private readonly string _outputName;
        private readonly OrtIoBinding?[] _bindings;
        private readonly List<IDisposable> _owned = [];

        public Scratch(InferenceSession session, int maxTokens, int dimensions, bool needsTokenTypes, string outputName)
        {
            _session = session;
            _dimensions = dimensions;
            _needsTokenTypes = needsTokenTypes;
            _outputName = outputName;
            Ids = GC.AllocateArray<long>(maxTokens, pinned: true);
            Mask = GC.AllocateArray<long>(maxTokens, pinned: true);
            Types = needsTokenTypes ? GC.AllocateArray<long>(maxTokens, pinned: true) : [];
            Hidden = GC.AllocateUninitializedArray<float>(maxTokens * dimensions, pinned: true);
            _bindings = new OrtIoBinding?[maxTokens + 1];
        }

        public long[] Ids { get; }

        public long[] Mask { get; }

        private long[] Types { get; }

        /// <summary>The output [1, tokens, dimensions] of the last pass, row-major from the start.</summary>
        public float[] Hidden { get; }

        public RunOptions RunOptions { get; } = new();

        /// <summary>
        /// The binding for <paramref name="tokens"/> tokens: inputs [1, tokens] over the first tokens of the buffers,
        /// the output [1, tokens, dimensions] over <see cref="Hidden"/>.
        /// </summary>
        public OrtIoBinding Bind(int tokens)
        {
            if (_bindings[tokens] is { } bound) return bound;
            long[] shape = [1, tokens];
            var binding = Own(_session.CreateIoBinding());
            binding.BindInput("input_ids", View(Ids));
            binding.BindInput("attention_mask", View(Mask));
            if (_needsTokenTypes) binding.BindInput("token_type_ids", View(Types));
            binding.BindOutput(_outputName, Own(OrtValue.CreateTensorValueFromMemory(OrtMemoryInfo.DefaultInstance,
                MemoryMarshal.CreateFromPinnedArray(Hidden, 0, tokens * _dimensions), [1, tokens, _dimensions])));
            return _bindings[tokens] = binding;

            OrtValue View(long[] buffer)
                => Own(OrtValue.CreateTensorValueFromMemory(OrtMemoryInfo.DefaultInstance, MemoryMarshal.CreateFromPinnedArray(buffer, 0, tokens), shape));
        }

        public void Dispose()
        {
            // Bindings first (they refer to the values), then the values.
            foreach (var d in _owned.OfType<OrtIoBinding>()) d.Dispose();
            foreach (var d in _owned.Where(d => d is not OrtIoBinding)) d.Dispose();
            RunOptions.Dispose();
        }

        private T Own<T>(T disposable) where T : IDisposable
        {
            _owned.Add(disposable);
            return disposable;
        }
    }
}
