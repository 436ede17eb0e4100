using System.Runtime.InteropServices;
using System.Text.Json;
using TaskPhrase.Onnx;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// all-MiniLM-L6-v2 embeddings of CLINC150 (Larson et al., 2019) for search benchmarks on real vectors: training
/// queries grouped by intent (phrases) and validation queries (queries). Embedded once with the bundled model and
/// cached in the scratch folder (keyed by the dataset's size and the model's hash).
/// </summary>
internal sealed class RealEmbeddings
{
    private const int Dimensions = 384;
    private readonly float[] _phrases;   // intent-major: intent i's training queries in file order
    private readonly int[] _intentStart; // row of each intent's first query, plus the end
    private readonly float[] _queries;

    private RealEmbeddings(float[] phrases, int[] intentStart, float[] queries)
    {
        _phrases = phrases;
        _intentStart = intentStart;
        _queries = queries;
    }

    public static RealEmbeddings Load(string path)
    {
        if (path.Length == 0) path = Path.GetFullPath(Path.Combine(BenchmarkPaths.RepoRoot, "..", "shared", "datasets", "clinc150", "clinc150_train_val.json"));
        if (Directory.Exists(path)) path = Path.Combine(path, "clinc150_train_val.json");
        if (!File.Exists(path)) throw new FileNotFoundException($"CLINC150 not found at {path}; pass --clinc150 FILE (clinc150_train_val.json).");
        using var doc = JsonDocument.Parse(File.ReadAllBytes(path));
        var byIntent = new SortedDictionary<string, List<string>>(StringComparer.Ordinal);
        foreach (var row in doc.RootElement.GetProperty("train").EnumerateArray())
        {
            string intent = row[1].GetString()!;
            if (!byIntent.TryGetValue(intent, out var list)) byIntent[intent] = list = [];
            list.Add(row[0].GetString()!);
        }
        var texts = byIntent.Values.SelectMany(l => l).ToList();
        var starts = new List<int> { 0 };
        foreach (var l in byIntent.Values) starts.Add(starts[^1] + l.Count);
        var queries = doc.RootElement.GetProperty("val").EnumerateArray().Select(r => r[0].GetString()!).Where((_, i) => i % 10 == 0).Take(300).ToList();

        string cache = Path.Combine(BenchmarkPaths.Scratch, $"clinc150-minilm-{texts.Count}-{queries.Count}.f32");
        float[] all;
        if (File.Exists(cache) && new FileInfo(cache).Length == (long)(texts.Count + queries.Count) * Dimensions * 4)
        {
            all = new float[(texts.Count + queries.Count) * Dimensions];
            File.OpenRead(cache).ReadExactly(MemoryMarshal.AsBytes(all.AsSpan()));
        }
        else
        {
            Console.Error.WriteLine($"embedding {texts.Count + queries.Count} CLINC150 queries once (cached in {cache}) …");
            using var embedder = OnnxEmbedder.CreateDefault();
            var (vectors, _) = embedder.EmbedMany([.. texts, .. queries]);
            all = vectors.SelectMany(v => v).ToArray();
            File.WriteAllBytes(cache, MemoryMarshal.AsBytes(all.AsSpan()).ToArray());
        }
        return new RealEmbeddings(all[..(texts.Count * Dimensions)], [.. starts], all[(texts.Count * Dimensions)..]);
    }

    /// <summary>
    /// <paramref name="count"/> phrase rows in tasks of <paramref name="perTask"/>: 1,000 takes the first ten queries of the
    /// first 100 intents; larger sizes take each intent's queries in groups of ten, intent by intent in turn.
    /// </summary>
    public float[] Phrases(int count, int perTask)
    {
        int intents = _intentStart.Length - 1, tasks = count / perTask;
        var rows = new List<int>(count);
        for (int group = 0; rows.Count < count; group++)
        {
            int before = rows.Count;
            for (int i = 0; i < intents && rows.Count < count; i++)
            {
                int start = _intentStart[i] + group * perTask;
                if (start + perTask > _intentStart[i + 1]) continue;
                for (int k = 0; k < perTask; k++) rows.Add(start + k);
            }
            if (rows.Count == before) throw new ArgumentException($"CLINC150 has fewer than {count} training queries in groups of {perTask} ({tasks} tasks).");
        }
        var matrix = new float[count * Dimensions];
        for (int r = 0; r < count; r++) _phrases.AsSpan(rows[r] * Dimensions, Dimensions).CopyTo(matrix.AsSpan(r * Dimensions));
        return matrix;
    }

    /// <summary>The <paramref name="round"/>-th query (cycling through the validation queries).</summary>
    public ReadOnlySpan<float> Query(int round) => _queries.AsSpan(round % (_queries.Length / Dimensions) * Dimensions, Dimensions);
}
