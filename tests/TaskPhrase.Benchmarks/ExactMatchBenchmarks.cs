using BenchmarkDotNet.Attributes;
using TaskPhrase.Resolution;
using TaskPhrase.Text;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// The paths that need no model: an approved phrase (exact match, step 3) and input that is empty after
/// normalisation (step 2), with normalising the text alone as the baseline. The model is loaded (the resolver needs
/// it for its registry) but never called here.
/// </summary>
[MemoryDiagnoser]
public class ExactMatchBenchmarks
{
    private ModelSetup _setup = null!;

    [GlobalSetup]
    public void Setup() => _setup = new ModelSetup();

    [GlobalCleanup]
    public void Cleanup() => _setup.Dispose();

    [Benchmark(Baseline = true)]
    public string Normalize() => TextNormalizer.Normalize(ModelSetup.ExactCommand);

    [Benchmark]
    public Resolution.Resolution ExactMatch() => _setup.Resolver.Resolve(ModelSetup.ExactCommand);

    [Benchmark]
    public Resolution.Resolution ExactMatchMixedCase() => _setup.Resolver.Resolve("  Water the BASIL. ");

    [Benchmark]
    public Resolution.Resolution Empty() => _setup.Resolver.Resolve(" \t ");
}
