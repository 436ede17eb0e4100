using BenchmarkDotNet.Attributes;
using TaskPhrase.Onnx;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// Compiling a 1,000-phrase registry (100 tasks × 10 phrases) with the real model, batch size 32 (the default):
/// embedding alone (<see cref="OnnxEmbedder.EmbedMany"/>) and the whole <see cref="TaskIndexBuilder.BuildAsync"/>
/// (embed, write, reload and check). Times are per phrase (OperationsPerInvoke = 1,000): phrases/s = 1 s / time.
/// </summary>
[MemoryDiagnoser]
public class BuildBenchmarks
{
    private const int PhraseCount = 1000;
    private OnnxEmbedder _embedder = null!;
    private TaskRegistry _registry = null!;
    private string[] _phrases = null!;
    private string _path = null!;

    [GlobalSetup]
    public void Setup()
    {
        _embedder = OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory);
        _registry = SyntheticRegistry.Load(100, 10);
        _phrases = _registry.Tasks.SelectMany(t => t.Phrases).ToArray();
        if (_phrases.Length != PhraseCount) throw new InvalidOperationException($"Expected {PhraseCount} phrases, got {_phrases.Length}.");
        _path = Path.Combine(BenchmarkPaths.Scratch, "build-1000.tpx");
    }

    [GlobalCleanup]
    public void Cleanup() => _embedder.Dispose();

    [Benchmark(Baseline = true, OperationsPerInvoke = PhraseCount)]
    public int EmbedMany() => _embedder.EmbedMany(_phrases).Vectors.Length;

    [Benchmark(OperationsPerInvoke = PhraseCount)]
    public int BuildIndex() => TaskIndexBuilder.BuildAsync(_path, _registry, _embedder).GetAwaiter().GetResult().PhraseCount;
}
