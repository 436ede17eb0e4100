using System.Numerics.Tensors;
using TaskPhrase.Conditioning;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;
using TaskPhrase.Resolution.Scoring;
using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

/// <summary>
/// Everything a resolver needs for one registry, precomputed and immutable: the phrase matrix, centroids,
/// look-alike vectors, the exact-match table and each task's vocabulary. Swapped atomically on reload.
/// </summary>
internal sealed record ResolverState
{
    public required TaskRegistry Registry { get; init; }
    public required EmbeddingModelInfo Model { get; init; }
    public required ScoringStrategy Scoring { get; init; }
    public required int Dimensions { get; init; }

    /// <summary>Approved phrase embeddings, row-major, tasks in registry order then phrases in order.</summary>
    public required float[] Phrases { get; init; }

    /// <summary>For each phrase row, the task's position.</summary>
    public required int[] PhraseTask { get; init; }

    /// <summary>For each phrase row, its position within its task's phrase list.</summary>
    public required int[] PhraseOrdinal { get; init; }

    /// <summary>First phrase row of each task, and the row count at the end (task t's rows are [t], up to [t + 1]).</summary>
    public required int[] TaskRowStart { get; init; }

    /// <summary>Normalised centroid of each task, row-major.</summary>
    public required float[] Centroids { get; init; }

    /// <summary>must_reject embeddings, row-major, and their task positions.</summary>
    public required float[] MustReject { get; init; }
    public required int[] MustRejectTask { get; init; }

    /// <summary>Match key of each approved phrase → phrase row.</summary>
    public required Dictionary<string, int> Exact { get; init; }

    /// <summary>Per task: stems of its vocabulary (phrases, title, also_words).</summary>
    public required HashSet<string>[] Vocabulary { get; init; }

    /// <summary>Per task: negation cues its own phrases carry.</summary>
    public required IReadOnlySet<string>[] TaskNegations { get; init; }

    /// <summary>
    /// Per task: its anchor stems — content words present in at least <see cref="AnchorShare"/> of its approved phrases
    /// (in practice the task's object: "basil", "kettle", "blanket"). An utterance matched to one task that names
    /// another task's anchor, uncovered by its own vocabulary, mixes two tasks and is refused as a look-alike.
    /// </summary>
    public required HashSet<string>[] Anchors { get; init; }

    /// <summary>Share of a task's phrases (rounded down) a stem must appear in to be an anchor.</summary>
    public const double AnchorShare = 0.5;

    public required HazardLexicon Hazards { get; init; }

    /// <summary>Every lower-case word of the registry's phrases, titles and also_words (for typo correction).</summary>
    public required IReadOnlySet<string> Words { get; init; }

    /// <summary><see cref="Words"/> in a stable order.</summary>
    public required IReadOnlyList<string> WordList { get; init; }

    /// <summary>Optional precomputed FiLM conditioning, one row per approved phrase row.</summary>
    public FilmTable? Film { get; init; }

    /// <summary>The whitening (for <see cref="ScoringStrategy.Whitened"/>) or the head (for <see cref="ScoringStrategy.Head"/>); null otherwise.</summary>
    public Whitening? Whitening { get; init; }
    public TaskHead? Head { get; init; }

    /// <summary>The 8-bit phrase screen (best-phrase scoring over at least <see cref="PhraseScreen.MinRows"/> rows), else null.</summary>
    public PhraseScreen? Screen { get; init; }

    /// <summary>k of <see cref="ScoringStrategy.TopK"/> (set after <see cref="Build"/> from the registry or the options).</summary>
    public int TopK { get; init; } = 3;

    /// <summary>Weight of the centroid cosine in <see cref="ScoringStrategy.Blend"/> (the rest goes to the best phrase).</summary>
    public float BlendCentroidWeight { get; init; } = 0.5f;

    public int TaskCount => Registry.Tasks.Count;

    public static ResolverState Build(TaskRegistry registry, EmbeddingModelInfo model, ReadOnlySpan<float> phrases,
        ReadOnlySpan<float> mustReject, ScoringStrategy scoring, LearnedScoringOptions? learned = null, TaskHead? head = null)
    {
        int dims = model.Dimensions;
        var tasks = registry.Tasks;
        int phraseCount = tasks.Sum(t => t.Phrases.Count);
        int rejectCount = tasks.Sum(t => t.MustReject.Count);
        if (phrases.Length != phraseCount * dims)
            throw new ArgumentException($"Expected {phraseCount} phrase embeddings of {dims} dimensions, got {phrases.Length} values.", nameof(phrases));
        if (mustReject.Length != rejectCount * dims)
            throw new ArgumentException($"Expected {rejectCount} must_reject embeddings of {dims} dimensions, got {mustReject.Length} values.", nameof(mustReject));

        var phraseTask = new int[phraseCount];
        var phraseOrdinal = new int[phraseCount];
        var rejectTask = new int[rejectCount];
        var taskRowStart = new int[tasks.Count + 1];
        var centroids = new float[tasks.Count * dims];
        var exact = new Dictionary<string, int>(StringComparer.Ordinal);
        var vocab = new HashSet<string>[tasks.Count];
        var negations = new IReadOnlySet<string>[tasks.Count];
        var anchors = new HashSet<string>[tasks.Count];
        int row = 0, rrow = 0;
        for (int t = 0; t < tasks.Count; t++)
        {
            var task = tasks[t];
            taskRowStart[t] = row;
            var centroid = centroids.AsSpan(t * dims, dims);
            var cues = new HashSet<string>(StringComparer.Ordinal);
            vocab[t] = new HashSet<string>(StringComparer.Ordinal);
            foreach (var w in WordStemmer.Words(task.Title).Concat(task.AlsoWords.SelectMany(WordStemmer.Words)))
                vocab[t].Add(WordStemmer.Stem(w));
            var stemCounts = new Dictionary<string, int>(StringComparer.Ordinal);
            for (int p = 0; p < task.Phrases.Count; p++, row++)
            {
                phraseTask[row] = t;
                phraseOrdinal[row] = p;
                exact.TryAdd(TextNormalizer.MatchKey(task.Phrases[p]), row);
                TensorPrimitives.Add(centroid, phrases.Slice(row * dims, dims), centroid);
                var words = WordStemmer.Words(task.Phrases[p]);
                foreach (var w in words) vocab[t].Add(WordStemmer.Stem(w));
                foreach (var stem in words.Where(w => !StopWords.Contains(w)).Select(WordStemmer.Stem).Distinct())
                    stemCounts[stem] = stemCounts.GetValueOrDefault(stem) + 1;
                cues.UnionWith(NegationCues.All(words));
            }
            anchors[t] = stemCounts.Where(kv => kv.Value >= Math.Max(2, Math.Floor(AnchorShare * task.Phrases.Count))).Select(kv => kv.Key).ToHashSet(StringComparer.Ordinal);
            float norm = TensorPrimitives.Norm(centroid);
            if (norm > 0) TensorPrimitives.Divide(centroid, norm, centroid);
            negations[t] = cues;
            for (int r = 0; r < task.MustReject.Count; r++, rrow++) rejectTask[rrow] = t;
        }
        taskRowStart[tasks.Count] = row;
        var allWords = tasks.SelectMany(t => t.Phrases.Concat(t.AlsoWords).Append(t.Title)).SelectMany(WordStemmer.Words)
            .Distinct(StringComparer.Ordinal).Order(StringComparer.Ordinal).ToArray();
        var settings = registry.Settings;
        return new ResolverState
        {
            Registry = registry,
            Model = model,
            Scoring = scoring,
            Dimensions = dims,
            Phrases = phrases.ToArray(),
            PhraseTask = phraseTask,
            PhraseOrdinal = phraseOrdinal,
            TaskRowStart = taskRowStart,
            Centroids = centroids,
            MustReject = mustReject.ToArray(),
            MustRejectTask = rejectTask,
            Exact = exact,
            Vocabulary = vocab,
            TaskNegations = negations,
            Anchors = anchors,
            Words = allWords.ToHashSet(StringComparer.Ordinal),
            WordList = allWords,
            Hazards = HazardLexicon.BuiltIn.With(settings.HazardWords, settings.AllowWords),
            Screen = (scoring is ScoringStrategy.BestPhrase or ScoringStrategy.Blend or ScoringStrategy.TopK) && phraseCount >= PhraseScreen.MinRows ? PhraseScreen.Build(phrases, dims) : null,
            BlendCentroidWeight = (float)(learned ?? LearnedScoringOptions.Default).BlendCentroidWeight,
            Whitening = scoring == ScoringStrategy.Whitened ? Whitening.Fit(phrases, phraseTask, tasks.Count, dims, learned) : null,
            Head = scoring != ScoringStrategy.Head ? null
                : head is null ? TaskHead.Train(phrases, phraseTask, tasks.Count, mustReject, dims, learned)
                : head.TaskCount == tasks.Count && head.Dimensions == dims ? head
                : throw new ArgumentException($"The task head has {head.TaskCount} tasks of {head.Dimensions} dimensions; the registry has {tasks.Count} of {dims}.", nameof(head)),
        };
    }
}
