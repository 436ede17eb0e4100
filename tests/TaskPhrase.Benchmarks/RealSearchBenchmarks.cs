using System.Numerics.Tensors;
using BenchmarkDotNet.Attributes;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// Phrase search on real embeddings (all-MiniLM-L6-v2 of CLINC150, Larson et al., 2019; see <see cref="RealEmbeddings"/>):
/// ten training queries of one intent per task, and each call's query the next of 300 validation queries, so the
/// screen's pruning meets real score distributions. <see cref="TaskResolver.Rank"/> under each scoring strategy
/// against a textbook brute-force scan (baseline). BenchmarkDotNet calls each operation many times in a row, so these
/// are warm-cache figures; <c>search --real</c> interleaves the operations (colder caches).
/// </summary>
[MemoryDiagnoser]
public class RealSearchBenchmarks
{
    private const int Dimensions = 384;
    private const int PhrasesPerTask = 10;
    private const int Queries = 300;
    private RealEmbeddings _clinc = null!;
    private float[] _matrix = null!;
    private float[] _query = null!;
    private float[] _sims = null!;
    private float[] _best = null!;
    private TaskResolver _resolver = null!;
    private int _next;

    [Params(1_000, 10_000)]
    public int Phrases { get; set; }

    [Params(ScoringStrategy.Centroid, ScoringStrategy.BestPhrase, ScoringStrategy.Blend, ScoringStrategy.TopK, ScoringStrategy.Whitened)]
    public ScoringStrategy Scoring { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        _clinc = RealEmbeddings.Load("");
        _matrix = _clinc.Phrases(Phrases, PhrasesPerTask);
        _query = new float[Dimensions];
        _sims = new float[Phrases];
        _best = new float[Phrases / PhrasesPerTask];
        var registry = SyntheticRegistry.Direct(Phrases / PhrasesPerTask, PhrasesPerTask);
        var generator = new HashedEmbeddingGenerator(Dimensions) { Query = _query };
        _resolver = TaskResolver.FromEmbeddings(registry, generator, generator.Model, _matrix, [],
            new ResolverOptions { Scoring = Scoring, UnintelligibleGuard = false });
    }

    private void NextQuery() => _clinc.Query(_next++ % Queries).CopyTo(_query);

    [Benchmark(Baseline = true)]
    public float BruteForce()
    {
        NextQuery();
        for (int r = 0; r < _sims.Length; r++) _sims[r] = TensorPrimitives.Dot(_query, _matrix.AsSpan(r * Dimensions, Dimensions));
        for (int t = 0; t < _best.Length; t++) _best[t] = TensorPrimitives.Max(_sims.AsSpan(t * PhrasesPerTask, PhrasesPerTask));
        return TensorPrimitives.Max(_best);
    }

    [Benchmark]
    public float Rank()
    {
        NextQuery();
        return _resolver.Rank("find the nearest task")[0].Score;
    }
}
