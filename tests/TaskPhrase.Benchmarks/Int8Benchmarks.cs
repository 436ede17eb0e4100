using BenchmarkDotNet.Attributes;
using TaskPhrase.Onnx;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// int8 against fp32, each at its best single-command setting (fp32: 2 intra-op threads, spinning off; int8: 1 thread):
/// resolving the 12-token <see cref="ModelSetup.Command"/> over the Harbor Street registry. Runs apart from each other
/// here; <c>int8-paired</c> (see Program.cs) interleaves them for a noise-robust ratio.
/// </summary>
[MemoryDiagnoser]
public class Int8ResolveBenchmarks
{
    private OnnxEmbedder _fp32 = null!, _int8 = null!;
    private TaskResolver _fp32Resolver = null!, _int8Resolver = null!;

    [GlobalSetup]
    public void Setup()
    {
        var registry = RegistryLoader.Load(BenchmarkPaths.HarborRegistry);
        _fp32 = OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory, new OnnxEmbedderOptions { IntraOpThreads = 2, AllowSpinning = false });
        _int8 = OnnxEmbedder.Create(Int8Models.Directory(), new OnnxEmbedderOptions { QuantizedIntraOpThreads = 1 });
        _fp32Resolver = TaskResolver.Create(registry, _fp32);
        _int8Resolver = TaskResolver.Create(registry, _int8);
    }

    [GlobalCleanup]
    public void Cleanup()
    {
        _fp32.Dispose();
        _int8.Dispose();
    }

    [Benchmark(Baseline = true)]
    public Resolution.Resolution ResolveFp32() => _fp32Resolver.Resolve(ModelSetup.Command);

    [Benchmark]
    public Resolution.Resolution ResolveInt8() => _int8Resolver.Resolve(ModelSetup.Command);
}

/// <summary>
/// Building the index of a 1,000-phrase registry (100 tasks × 10 phrases) with fp32 (2 threads) against int8 at its
/// default 1 thread and at 2 threads. Times are per phrase (OperationsPerInvoke = 1,000).
/// </summary>
[MemoryDiagnoser]
public class Int8BuildBenchmarks
{
    private const int PhraseCount = 1000;
    private OnnxEmbedder _fp32 = null!, _int8 = null!, _int8Two = null!;
    private TaskRegistry _registry = null!;
    private string _path = null!;

    [GlobalSetup]
    public void Setup()
    {
        string dir = Int8Models.Directory();
        _fp32 = OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory, new OnnxEmbedderOptions { IntraOpThreads = 2 });
        _int8 = OnnxEmbedder.Create(dir, new OnnxEmbedderOptions { QuantizedIntraOpThreads = 1 });
        _int8Two = OnnxEmbedder.Create(dir, new OnnxEmbedderOptions { QuantizedIntraOpThreads = 2 });
        _registry = SyntheticRegistry.Load(100, 10);
        int phrases = _registry.Tasks.Sum(t => t.Phrases.Count);
        if (phrases != PhraseCount) throw new InvalidOperationException($"Expected {PhraseCount} phrases, got {phrases}.");
        _path = Path.Combine(BenchmarkPaths.Scratch, "int8-build-1000.tpidx");
    }

    [GlobalCleanup]
    public void Cleanup()
    {
        _fp32.Dispose();
        _int8.Dispose();
        _int8Two.Dispose();
    }

    [Benchmark(Baseline = true, OperationsPerInvoke = PhraseCount)]
    public int BuildFp32() => TaskIndexBuilder.BuildAsync(_path, _registry, _fp32).GetAwaiter().GetResult().PhraseCount;

    [Benchmark(OperationsPerInvoke = PhraseCount)]
    public int BuildInt8OneThread() => TaskIndexBuilder.BuildAsync(_path, _registry, _int8).GetAwaiter().GetResult().PhraseCount;

    [Benchmark(OperationsPerInvoke = PhraseCount)]
    public int BuildInt8TwoThreads() => TaskIndexBuilder.BuildAsync(_path, _registry, _int8Two).GetAwaiter().GetResult().PhraseCount;
}
