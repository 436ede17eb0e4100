using BenchmarkDotNet.Attributes;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// Loading a compiled 1,000-phrase index (100 tasks × 10 phrases, with look-alike section): checksums, registry
/// rebuilt from canonical JSON, embeddings; then a resolver over it. A model-free generator counts texts embedded:
/// setup checks that loading and creating the resolver embedded none (no forward passes).
/// </summary>
[MemoryDiagnoser]
public class IndexLoadBenchmarks
{
    private string _path = null!;
    private HashedEmbeddingGenerator _generator = null!;

    [GlobalSetup]
    public void Setup()
    {
        _generator = new HashedEmbeddingGenerator();
        var registry = SyntheticRegistry.Load(100, 10);
        _path = Path.Combine(BenchmarkPaths.Scratch, "index-load-1000.tpx");
        TaskIndexBuilder.BuildAsync(_path, registry, _generator).GetAwaiter().GetResult();
        long before = _generator.TextsEmbedded;
        LoadAndCreateResolver();
        if (_generator.TextsEmbedded != before)
            throw new InvalidOperationException($"Loading the index embedded {_generator.TextsEmbedded - before} texts; it must need no forward passes.");
    }

    [Benchmark(Baseline = true)]
    public TaskIndex Load() => TaskIndex.Load(_path, _generator.Model);

    [Benchmark]
    public TaskResolver LoadAndCreateResolver() => TaskResolver.FromIndex(TaskIndex.Load(_path, _generator.Model), _generator);
}
