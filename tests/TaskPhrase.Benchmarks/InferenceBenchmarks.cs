using BenchmarkDotNet.Attributes;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// The model path of one 12-token command, against a bare ONNX Runtime forward pass of the same tokens with the same
/// session options (baseline): <see cref="Onnx.OnnxEmbedder.Embed(string, Span{float})"/> adds tokenising, pooling and
/// normalising; <see cref="TaskResolver.Resolve"/> adds normalising the text, the guards, scoring and the decision.
/// Runs apart from each other here; <c>paired</c> (see Program.cs) interleaves raw and resolve for a noise-robust ratio.
/// </summary>
[MemoryDiagnoser]
public class InferenceBenchmarks
{
    private ModelSetup _setup = null!;
    private readonly float[] _vector = new float[384];

    [GlobalSetup]
    public void Setup() => _setup = new ModelSetup();

    [GlobalCleanup]
    public void Cleanup() => _setup.Dispose();

    [Benchmark(Baseline = true)]
    public float RawForward() => _setup.Raw.Run();

    [Benchmark]
    public bool Embed() => _setup.Embedder.Embed(ModelSetup.Command, _vector);

    [Benchmark]
    public Resolution.Resolution Resolve() => _setup.Resolver.Resolve(ModelSetup.Command);
}
