using BenchmarkDotNet.Attributes;
using FastBertTokenizer;
using TaskPhrase.Onnx;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// Tokenising the benchmark command: FastBertTokenizer's span API on its own (baseline), our adapter
/// (lock, one token of slack to detect truncation, copy), and the word-piece statistics of the unintelligible guard.
/// </summary>
[MemoryDiagnoser]
public class TokenizerBenchmarks
{
    private readonly long[] _ids = new long[256];
    private readonly long[] _mask = new long[256];
    private BertTokenizer _bert = null!;
    private WordPieceTokenizer _tokenizer = null!;

    [GlobalSetup]
    public void Setup()
    {
        string vocab = Path.Combine(BenchmarkPaths.ModelDirectory, "vocab.txt");
        _bert = new BertTokenizer();
        using (var reader = File.OpenText(vocab)) _bert.LoadVocabulary(reader, convertInputToLowercase: true);
        _tokenizer = new WordPieceTokenizer(vocab, lowercase: true);
    }

    [Benchmark(Baseline = true)]
    public int FastBertSpan() => _bert.Encode(ModelSetup.Command, _ids, _mask);

    [Benchmark]
    public int Encode() => _tokenizer.Encode(ModelSetup.Command, _ids, _mask).Count;

    [Benchmark]
    public int Analyze() => _tokenizer.Analyze(ModelSetup.Command, 256).Pieces;
}
