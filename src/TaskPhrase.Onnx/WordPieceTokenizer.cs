using FastBertTokenizer;
using TaskPhrase.Embedding;

namespace TaskPhrase.Onnx;

/// <summary>
/// Uncased or cased BERT WordPiece tokenisation (FastBertTokenizer) into caller-supplied buffers,
/// with truncation detection and word-piece statistics. Thread-safe.
/// </summary>
internal sealed class WordPieceTokenizer
{
    private readonly BertTokenizer _tokenizer = new();
    private readonly string[] _vocab;
    private readonly long _unknownId;
    private readonly long _clsId;
    private readonly long _sepId;
    private readonly Lock _gate = new();

    public WordPieceTokenizer(string vocabPath, bool lowercase)
    {
        _vocab = File.ReadAllLines(vocabPath);
        if (_vocab.Length < 10)
            throw new InvalidDataException($"{vocabPath}: vocabulary has only {_vocab.Length} lines; expected a BERT vocab.txt.");
        using (var reader = new StringReader(string.Join('\n', _vocab)))
            _tokenizer.LoadVocabulary(reader, lowercase);
        _unknownId = Array.IndexOf(_vocab, "[UNK]");
        _clsId = Array.IndexOf(_vocab, "[CLS]");
        _sepId = Array.IndexOf(_vocab, "[SEP]");
        if (_unknownId < 0 || _clsId < 0 || _sepId < 0)
            throw new InvalidDataException($"{vocabPath}: vocabulary lacks [UNK], [CLS] or [SEP].");
    }

    public int VocabularySize => _vocab.Length;

    /// <summary>Token string of an id.</summary>
    public string TokenOf(long id) => id >= 0 && id < _vocab.Length ? _vocab[id] : "[?]";

    /// <summary>
    /// Writes [CLS] pieces [SEP] into <paramref name="ids"/> (its length is the token limit) and returns
    /// the number of tokens and whether the input was cut.
    /// </summary>
    public (int Count, bool Truncated) Encode(string text, Span<long> ids, Span<long> mask)
    {
        // One token of slack tells a cut from an exact fit.
        int limit = ids.Length;
        Span<long> probeIds = limit + 1 <= 1024 ? stackalloc long[limit + 1] : new long[limit + 1];
        Span<long> probeMask = limit + 1 <= 1024 ? stackalloc long[limit + 1] : new long[limit + 1];
        int count;
        lock (_gate) count = _tokenizer.Encode(text, probeIds, probeMask);
        if (count <= limit)
        {
            probeIds[..count].CopyTo(ids);
            ids[count..].Clear();
            mask[..count].Fill(1);
            mask[count..].Clear();
            return (count, false);
        }
        lock (_gate) count = _tokenizer.Encode(text, ids, mask);
        return (count, true);
    }

    /// <summary>Word-piece statistics for the unintelligible guard.</summary>
    public SubwordStatistics Analyze(string text, int limit)
    {
        Span<long> ids = limit <= 512 ? stackalloc long[limit] : new long[limit];
        Span<long> mask = limit <= 512 ? stackalloc long[limit] : new long[limit];
        var (count, _) = Encode(text, ids, mask);
        int words = 0, alpha = 0, pieces = 0, unknown = 0, fragmented = 0, whole = 0;
        int wordStart = -1;
        for (int i = 1; i <= count; i++)
        {
            bool end = i == count || ids[i] == _sepId;
            bool continuation = !end && TokenOf(ids[i]).StartsWith("##", StringComparison.Ordinal);
            if ((end || !continuation) && wordStart >= 0)
            {
                // Close the word that started at wordStart and spans [wordStart, i).
                int span = i - wordStart;
                string first = TokenOf(ids[wordStart]);
                bool isAlpha = first.Length > 0 && char.IsLetter(first[0]);
                words++;
                if (isAlpha)
                {
                    alpha++;
                    if (span >= 2) fragmented++;
                    else if (first.Length >= 3 && ids[wordStart] != _unknownId) whole++;
                }
                wordStart = -1;
            }
            if (end) break;
            pieces++;
            if (ids[i] == _unknownId) unknown++;
            if (!continuation) wordStart = i;
        }
        return new SubwordStatistics(words, alpha, pieces, unknown, fragmented, whole);
    }
}
