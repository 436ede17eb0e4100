using System.Numerics.Tensors;
using BenchmarkDotNet.Attributes;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// Phrase search over synthetic registries of random unit vectors (10 phrases per task, 384 dimensions): the
/// resolver's <see cref="TaskResolver.Rank"/> (text normalisation, scoring, top five candidates; the query vector
/// comes from a model-free generator) against a textbook brute-force scan, one dot product per phrase row and the
/// best row per task (baseline).
/// </summary>
[MemoryDiagnoser]
public class SearchBenchmarks
{
    private const int Dimensions = 384;
    private const int PhrasesPerTask = 10;
    private float[] _matrix = null!;
    private float[] _query = null!;
    private float[] _sims = null!;
    private float[] _best = null!;
    private TaskResolver _resolver = null!;

    [Params(1_000, 10_000, 100_000)]
    public int Phrases { get; set; }

    [Params(ScoringStrategy.BestPhrase, ScoringStrategy.Centroid)]
    public ScoringStrategy Scoring { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        var random = new Random(20240611);
        _matrix = new float[Phrases * Dimensions];
        for (int r = 0; r < Phrases; r++) HashedEmbeddingGenerator.Fill(random, _matrix.AsSpan(r * Dimensions, Dimensions));
        _query = new float[Dimensions];
        HashedEmbeddingGenerator.Fill(random, _query);
        _sims = new float[Phrases];
        _best = new float[Phrases / PhrasesPerTask];

        var registry = SyntheticRegistry.Direct(Phrases / PhrasesPerTask, PhrasesPerTask);
        var generator = new HashedEmbeddingGenerator(Dimensions) { Query = _query };
        _resolver = TaskResolver.FromEmbeddings(registry, generator, generator.Model, _matrix, [],
            new ResolverOptions { Scoring = Scoring, UnintelligibleGuard = false });
    }

    [Benchmark(Baseline = true)]
    public float BruteForce()
    {
        for (int r = 0; r < _sims.Length; r++) _sims[r] = TensorPrimitives.Dot(_query, _matrix.AsSpan(r * Dimensions, Dimensions));
        for (int t = 0; t < _best.Length; t++) _best[t] = TensorPrimitives.Max(_sims.AsSpan(t * PhrasesPerTask, PhrasesPerTask));
        return TensorPrimitives.Max(_best);
    }

    [Benchmark]
    public float Rank() => _resolver.Rank("find the nearest task")[0].Score;
}
