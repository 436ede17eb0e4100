using System.Collections.ObjectModel;
using TaskPhrase.Embedding;

namespace TaskPhrase.Registry;

/// <summary>
/// The compiled, checksummed form of a registry: the registry itself (canonical JSON), the embedding of every
/// approved phrase, the identity of the model that made them, and named extra sections (FiLM tables, whitening
/// matrices, …) for other components. Write one with <see cref="Write"/>, read it with <see cref="Load(string, EmbeddingModelInfo?)"/>.
/// </summary>
/// <remarks>
/// <para>File layout, all integers little-endian:</para>
/// <list type="number">
/// <item><description>8 bytes magic <c>89 54 50 58 0D 0A 1A 0A</c> (0x89 "TPX" CR LF SUB LF: catches text-mode transfers and truncation early);</description></item>
/// <item><description>uint32 format version (<see cref="FormatVersion"/>), uint32 header length H;</description></item>
/// <item><description>H bytes of header JSON (UTF-8): <c>registry_hash</c>, <c>model</c> {id, sha256, dimensions, max_tokens, pooling},
/// <c>phrase_count</c>, <c>task_count</c>, <c>dimensions</c>, <c>data_length</c>, <c>blocks</c> and <c>sections</c>
/// (each entry: name, offset, length, sha256; offsets relative to the data region);</description></item>
/// <item><description>zero padding to a multiple of 8, then the data region: the <c>registry</c> block (canonical JSON,
/// see <see cref="RegistryCanonicalForm"/>), the <c>embeddings</c> block (float32, row-major, one row per approved
/// phrase: tasks in registry order, phrases in order), then the sections in ordinal name order, each block
/// starting at a multiple of 8;</description></item>
/// <item><description>32 bytes: SHA-256 of everything before them.</description></item>
/// </list>
/// <para>Writing is deterministic (no timestamps; the same inputs give the same bytes) and atomic (a temporary
/// file in the same directory, then a rename). An instance is immutable and thread-safe.</para>
/// </remarks>
public sealed partial class TaskIndex
{
    /// <summary>The index format version this library writes and reads.</summary>
    public const int FormatVersion = 1;

    /// <summary>Largest index file <see cref="Load(string, EmbeddingModelInfo?)"/> reads: 1 GiB.</summary>
    public const long MaxFileBytes = 1L << 30;

    private readonly float[] _embeddings;
    private readonly int[] _phraseTask;
    private readonly string[] _phrases;

    private TaskIndex(TaskRegistry registry, EmbeddingModelInfo model, float[] embeddings, int dimensions,
        IReadOnlyDictionary<string, ReadOnlyMemory<byte>> sections, string? sourcePath)
    {
        Registry = registry;
        Model = model;
        Dimensions = dimensions;
        _embeddings = embeddings;
        Sections = sections;
        SourcePath = sourcePath;
        var phraseTask = new List<int>();
        var phrases = new List<string>();
        for (int t = 0; t < registry.Tasks.Count; t++)
        {
            foreach (var phrase in registry.Tasks[t].Phrases)
            {
                phraseTask.Add(t);
                phrases.Add(phrase);
            }
        }
        _phraseTask = [.. phraseTask];
        _phrases = [.. phrases];
        Phrases = Array.AsReadOnly(_phrases);
    }

    /// <summary>The registry the index was built from, rebuilt from the stored canonical JSON.</summary>
    public TaskRegistry Registry { get; }

    /// <summary>The model whose embeddings the index holds.</summary>
    public EmbeddingModelInfo Model { get; }

    /// <summary>The registry's content hash (<see cref="TaskRegistry.ContentHash"/>).</summary>
    public string RegistryHash => Registry.ContentHash;

    /// <summary>Width of each phrase embedding.</summary>
    public int Dimensions { get; }

    /// <summary>Number of approved phrases (rows of <see cref="PhraseEmbeddings"/>).</summary>
    public int PhraseCount => _phrases.Length;

    /// <summary>All phrase embeddings, row-major and contiguous: <see cref="PhraseCount"/> rows of <see cref="Dimensions"/> floats.</summary>
    public ReadOnlyMemory<float> PhraseEmbeddings => _embeddings;

    /// <summary>For each phrase row, the position of its task in <see cref="TaskRegistry.Tasks"/>.</summary>
    public ReadOnlyMemory<int> PhraseTaskIndex => _phraseTask;

    /// <summary>The approved phrases, one per row, in row order.</summary>
    public IReadOnlyList<string> Phrases { get; }

    /// <summary>Named extra sections stored with the index (read-only views of the stored bytes).</summary>
    public IReadOnlyDictionary<string, ReadOnlyMemory<byte>> Sections { get; }

    /// <summary>The file the index was loaded from, or null.</summary>
    public string? SourcePath { get; }

    /// <summary>The embedding of phrase row <paramref name="row"/>.</summary>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="row"/> is not a row.</exception>
    public ReadOnlySpan<float> GetEmbedding(int row)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(row);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(row, PhraseCount);
        return _embeddings.AsSpan(row * Dimensions, Dimensions);
    }

    /// <summary>The task that phrase row <paramref name="row"/> belongs to.</summary>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="row"/> is not a row.</exception>
    public TaskDefinition GetTask(int row)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(row);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(row, PhraseCount);
        return Registry.Tasks[_phraseTask[row]];
    }

    private static ReadOnlyDictionary<string, ReadOnlyMemory<byte>> Freeze(IEnumerable<KeyValuePair<string, ReadOnlyMemory<byte>>> sections)
        => new(new SortedDictionary<string, ReadOnlyMemory<byte>>(sections.ToDictionary(StringComparer.Ordinal), StringComparer.Ordinal));
}
