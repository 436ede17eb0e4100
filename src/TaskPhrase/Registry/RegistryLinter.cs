using System.Globalization;
using System.Numerics.Tensors;
using Microsoft.Extensions.AI;
using TaskPhrase.Text;

namespace TaskPhrase.Registry;

/// <summary>
/// Checks a registry for wording problems that make resolution unreliable, for task authors: phrases that collide
/// with another task, phrases closer to another task than to their own, redundant near-duplicates, thin tasks,
/// negated, very short or very long phrases, and hazardous (<c>confirm: true</c>) tasks worded like harmless ones.
/// </summary>
/// <remarks>
/// <para>All approved phrases are embedded in one <see cref="IEmbeddingGenerator{TInput, TEmbedding}.GenerateAsync"/>
/// call, in registry order. Vectors are L2-normalised again here (a no-op for well-behaved generators), so cosine
/// similarity is the dot product.</para>
/// <para>"Closer to another task" compares a phrase with the centroid of the <em>other</em> phrases of its own task
/// (leave-one-out, so a phrase does not pull its own centre towards itself) and with the centroid of each other
/// task; tasks with a single phrase are skipped for it.</para>
/// <para>Cost: one embedding call and n²/2 dot products for n phrases. Stateless and thread-safe.</para>
/// </remarks>
public static class RegistryLinter
{
    /// <summary>Lints <paramref name="registry"/> with embeddings from <paramref name="generator"/>.</summary>
    /// <param name="registry">The registry to check.</param>
    /// <param name="generator">Any sentence-embedding generator; not disposed.</param>
    /// <param name="options">Bounds; <see cref="LintOptions.Default"/> when null.</param>
    /// <param name="cancellationToken">Cancels the embedding call.</param>
    /// <returns>The warnings, in a stable order: per task (registry order) the text checks, then the pairwise
    /// checks in phrase order, then the centroid checks.</returns>
    /// <exception cref="ArgumentNullException"><paramref name="registry"/> or <paramref name="generator"/> is null.</exception>
    /// <exception cref="InvalidOperationException">The generator returned the wrong number of vectors, vectors of
    /// different widths, or a zero or non-finite vector.</exception>
    /// <exception cref="OperationCanceledException"><paramref name="cancellationToken"/> was cancelled.</exception>
    public static async Task<IReadOnlyList<LintWarning>> LintAsync(TaskRegistry registry,
        IEmbeddingGenerator<string, Embedding<float>> generator, LintOptions? options = null,
        CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(registry);
        ArgumentNullException.ThrowIfNull(generator);
        options ??= LintOptions.Default;
        cancellationToken.ThrowIfCancellationRequested();

        var rows = new List<(int Task, string Text)>();
        for (int t = 0; t < registry.Tasks.Count; t++)
            foreach (var phrase in registry.Tasks[t].Phrases) rows.Add((t, phrase));

        var warnings = new List<LintWarning>();
        TextChecks(registry, options, warnings);
        if (rows.Count == 0) return warnings;

        var embeddings = await generator.GenerateAsync(rows.Select(r => r.Text), null, cancellationToken).ConfigureAwait(false);
        var (matrix, dims) = ToUnitMatrix(embeddings, rows.Count);

        PairChecks(registry, rows, matrix, dims, options, warnings);
        CentroidChecks(registry, rows, matrix, dims, warnings);
        return warnings.AsReadOnly();
    }

    private static void TextChecks(TaskRegistry registry, LintOptions options, List<LintWarning> warnings)
    {
        var negations = options.NegationWords
            .Select(n => n.ToLowerInvariant().Split(' ', StringSplitOptions.RemoveEmptyEntries))
            .Where(n => n.Length > 0)
            .ToArray();
        foreach (var task in registry.Tasks)
        {
            if (task.Phrases.Count < options.MinPhrases)
            {
                warnings.Add(new LintWarning(LintCodes.FewPhrases, task.Id, null, null, null, null,
                    $"task {task.Id} has {task.Phrases.Count} phrase{(task.Phrases.Count == 1 ? "" : "s")}, fewer than {options.MinPhrases}; add wordings the way its users say it, so paraphrases and recognition slips still match."));
            }
            foreach (var phrase in task.Phrases)
            {
                var words = Words(phrase);
                string? negation = FindNegation(words, negations);
                if (negation is not null)
                {
                    warnings.Add(new LintWarning(LintCodes.NegationInPhrase, task.Id, phrase, null, null, null,
                        $"the phrase '{phrase}' of task {task.Id} contains the negation '{negation}'; negated commands are refused, so an approved phrase should say what to do, not what not to do."));
                }
                if (words.Length < options.MinWords)
                {
                    warnings.Add(new LintWarning(LintCodes.ShortPhrase, task.Id, phrase, null, null, null,
                        $"the phrase '{phrase}' of task {task.Id} has {words.Length} word{(words.Length == 1 ? "" : "s")}; very short phrases match too much: say what to do and to what."));
                }
                else if (words.Length > options.MaxWords)
                {
                    warnings.Add(new LintWarning(LintCodes.LongPhrase, task.Id, phrase, null, null, null,
                        $"the phrase '{phrase}' of task {task.Id} has {words.Length} words, more than {options.MaxWords}; long phrases blur the embedding: keep the command and drop the rest."));
                }
            }
        }
    }

    private static void PairChecks(TaskRegistry registry, List<(int Task, string Text)> rows, float[] matrix, int dims,
        LintOptions options, List<LintWarning> warnings)
    {
        for (int i = 0; i < rows.Count; i++)
        {
            var vi = matrix.AsSpan(i * dims, dims);
            var ti = registry.Tasks[rows[i].Task];
            for (int j = i + 1; j < rows.Count; j++)
            {
                float sim = TensorPrimitives.Dot(vi, matrix.AsSpan(j * dims, dims));
                var tj = registry.Tasks[rows[j].Task];
                string a = rows[i].Text, b = rows[j].Text;
                if (rows[i].Task == rows[j].Task)
                {
                    if (sim >= options.NearDuplicateSimilarity)
                    {
                        warnings.Add(new LintWarning(LintCodes.NearDuplicate, ti.Id, a, ti.Id, b, sim,
                            $"the phrases '{a}' and '{b}' of task {ti.Id} are nearly the same (cosine {F(sim)} ≥ {F(options.NearDuplicateSimilarity)}); the second adds nothing: replace it with a different wording."));
                    }
                    continue;
                }
                if (sim >= options.CollisionSimilarity)
                {
                    warnings.Add(new LintWarning(LintCodes.CrossTaskCollision, ti.Id, a, tj.Id, b, sim,
                        $"the phrase '{a}' of task {ti.Id} collides with '{b}' of task {tj.Id} (cosine {F(sim)} ≥ {F(options.CollisionSimilarity)}); commands between them will be ambiguous or go to the wrong task: reword one of them."));
                }
                if (ti.Confirm != tj.Confirm && sim >= options.ConfirmSimilarity)
                {
                    var (hazard, hazardPhrase, plain, plainPhrase) = ti.Confirm ? (ti, a, tj, b) : (tj, b, ti, a);
                    warnings.Add(new LintWarning(LintCodes.ConfirmNearNonConfirm, hazard.Id, hazardPhrase, plain.Id, plainPhrase, sim,
                        $"the phrase '{hazardPhrase}' of task {hazard.Id} (confirm: true) is close to '{plainPhrase}' of task {plain.Id}, which needs no confirmation (cosine {F(sim)} ≥ {F(options.ConfirmSimilarity)}); a slip between them would start a hazardous task or skip a needed confirmation: make the wordings clearly different."));
                }
            }
        }
    }

    private static void CentroidChecks(TaskRegistry registry, List<(int Task, string Text)> rows, float[] matrix, int dims,
        List<LintWarning> warnings)
    {
        int taskCount = registry.Tasks.Count;
        var sums = new float[taskCount * dims];
        var unitCentroids = new float[taskCount * dims];
        for (int i = 0; i < rows.Count; i++)
        {
            var sum = sums.AsSpan(rows[i].Task * dims, dims);
            TensorPrimitives.Add(sum, matrix.AsSpan(i * dims, dims), sum);
        }
        var hasCentroid = new bool[taskCount];
        for (int t = 0; t < taskCount; t++)
            hasCentroid[t] = TryUnit(sums.AsSpan(t * dims, dims), unitCentroids.AsSpan(t * dims, dims));

        var rest = new float[dims];
        var restUnit = new float[dims];
        for (int i = 0; i < rows.Count; i++)
        {
            int own = rows[i].Task;
            if (registry.Tasks[own].Phrases.Count < 2) continue;
            var v = matrix.AsSpan(i * dims, dims);
            TensorPrimitives.Subtract(sums.AsSpan(own * dims, dims), v, rest);
            float ownSim = TryUnit(rest, restUnit) ? TensorPrimitives.Dot(v, restUnit) : -1f;

            int best = -1;
            float bestSim = float.NegativeInfinity;
            for (int t = 0; t < taskCount; t++)
            {
                if (t == own || !hasCentroid[t]) continue;
                float sim = TensorPrimitives.Dot(v, unitCentroids.AsSpan(t * dims, dims));
                if (sim > bestSim) { bestSim = sim; best = t; }
            }
            if (best < 0 || bestSim <= ownSim) continue;

            // Name the other task's phrase nearest to this one, so the author sees what it resembles.
            string? nearest = null;
            float nearestSim = float.NegativeInfinity;
            for (int j = 0; j < rows.Count; j++)
            {
                if (rows[j].Task != best) continue;
                float sim = TensorPrimitives.Dot(v, matrix.AsSpan(j * dims, dims));
                if (sim > nearestSim) { nearestSim = sim; nearest = rows[j].Text; }
            }
            var ownTask = registry.Tasks[own];
            var other = registry.Tasks[best];
            warnings.Add(new LintWarning(LintCodes.CloserToOtherTask, ownTask.Id, rows[i].Text, other.Id, nearest, bestSim,
                $"the phrase '{rows[i].Text}' of task {ownTask.Id} is closer to the centre of task {other.Id} (cosine {F(bestSim)}; its nearest phrase there is '{nearest}' at {F(nearestSim)}) than to the rest of its own task ({F(ownSim)}); reword it or move it to the task it means."));
        }
    }

    /// <summary>Copies the vectors into one row-major matrix of unit rows, checking count, width and values.</summary>
    private static (float[] Matrix, int Dims) ToUnitMatrix(GeneratedEmbeddings<Embedding<float>> embeddings, int expected)
    {
        if (embeddings is null || embeddings.Count != expected)
            throw new InvalidOperationException(
                $"The embedding generator returned {embeddings?.Count ?? 0} vectors for {expected} phrases; lint needs one vector per phrase.");
        int dims = embeddings[0].Vector.Length;
        if (dims == 0) throw new InvalidOperationException("The embedding generator returned empty vectors.");
        var matrix = new float[expected * dims];
        for (int i = 0; i < expected; i++)
        {
            var vector = embeddings[i].Vector.Span;
            if (vector.Length != dims)
                throw new InvalidOperationException(
                    $"The embedding generator returned vectors of different widths ({dims} and {vector.Length}); lint needs one model's vectors.");
            var row = matrix.AsSpan(i * dims, dims);
            if (!TryUnit(vector, row))
                throw new InvalidOperationException($"The embedding generator returned a zero or non-finite vector for phrase {i + 1}.");
        }
        return (matrix, dims);
    }

    private static bool TryUnit(ReadOnlySpan<float> source, Span<float> destination)
    {
        float norm = TensorPrimitives.Norm(source);
        if (!(norm > 0) || !float.IsFinite(norm)) return false;
        TensorPrimitives.Divide(source, norm, destination);
        return true;
    }

    /// <summary>Words of a phrase: lower-case, split at white space and at punctuation other than apostrophes.</summary>
    internal static string[] Words(string phrase)
    {
        string lower = TextNormalizer.Normalize(phrase).ToLowerInvariant().Replace('\u2019', '\'').Replace('\u2018', '\'');
        var words = new List<string>();
        var current = new System.Text.StringBuilder();
        foreach (char c in lower)
        {
            if (char.IsLetterOrDigit(c) || (c == '\'' && current.Length > 0)) current.Append(c);
            else Flush();
        }
        Flush();
        return [.. words];

        void Flush()
        {
            string w = current.ToString().Trim('\'');
            if (w.Length > 0) words.Add(w);
            current.Clear();
        }
    }

    private static string? FindNegation(string[] words, string[][] negations)
    {
        for (int i = 0; i < words.Length; i++)
        {
            foreach (var negation in negations)
            {
                if (i + negation.Length > words.Length) continue;
                bool match = true;
                for (int k = 0; k < negation.Length && match; k++) match = words[i + k] == negation[k];
                if (match) return string.Join(' ', negation);
            }
            if (words[i].EndsWith("n't", StringComparison.Ordinal)) return words[i];
        }
        return null;
    }

    private static string F(float value) => value.ToString("0.000", CultureInfo.InvariantCulture);
}
