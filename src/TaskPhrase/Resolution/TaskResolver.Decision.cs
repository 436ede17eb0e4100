using System.Numerics.Tensors;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

public sealed partial class TaskResolver
{
    /// <summary>An utterance after the steps that need no model: normalisation, empty, exact match, unintelligible.</summary>
    /// <remarks><c>Text</c> is what is embedded and checked (typo corrections applied); <c>Normalized</c> the normalised input.</remarks>
    private readonly record struct Prepared(string Original, string Text, bool Truncated, Resolution? Early, IReadOnlyList<string>? Corrections = null, string? Normalized = null);

    private Prepared Prepare(ResolverState state, string utterance)
    {
        string text = TextNormalizer.Normalize(utterance);
        bool truncated = false;
        if (text.Length > _options.MaxInputChars)
        {
            int cut = _options.MaxInputChars;
            if (char.IsHighSurrogate(text[cut - 1])) cut--;
            text = text[..cut];
            truncated = true;
        }
        if (text.Length == 0 || TextNormalizer.MatchKey(text).Length == 0 && !text.Any(char.IsLetterOrDigit))
        {
            var reason = text.Length == 0 ? RejectionReason.Empty : RejectionReason.Unintelligible;
            string detail = text.Length == 0 ? "nothing left after normalisation" : "no letters or digits";
            return new Prepared(utterance, text, truncated, Rejected(state, utterance, text, reason, detail, truncated));
        }
        if (state.Exact.TryGetValue(TextNormalizer.MatchKey(text), out int row))
        {
            var task = state.Registry.Tasks[state.PhraseTask[row]];
            var phrase = task.Phrases[state.PhraseOrdinal[row]];
            return new Prepared(utterance, text, truncated, new Resolution
            {
                Utterance = utterance,
                Normalized = text,
                Outcome = ResolutionOutcome.Accepted,
                Task = task,
                Phrase = phrase,
                Score = 1f,
                ExactMatch = true,
                Truncated = truncated,
                Candidates = [new TaskCandidate(task.Id, phrase, 1f)],
                Conditioning = state.Film?.Get(row),
                Detail = "exact match with an approved phrase",
                RegistryHash = state.Registry.ContentHash,
                ModelId = state.Model.Id,
            });
        }
        if (_options.UnintelligibleGuard && _span is not null && UnintelligibleGuard.Check(text, _span.Analyze(text)) is { } why)
            return new Prepared(utterance, text, truncated, Rejected(state, utterance, text, RejectionReason.Unintelligible, why, truncated));
        if (_options.UnintelligibleGuard && _span is null && UnintelligibleGuard.CheckLetters(text) is { } why2)
            return new Prepared(utterance, text, truncated, Rejected(state, utterance, text, RejectionReason.Unintelligible, why2, truncated));
        if (_options.CorrectTypos && _span is not null)
        {
            var (corrected, corrections) = VocabularyCorrector.Correct(text, state.Words, state.WordList, _span);
            if (corrections.Count > 0) return new Prepared(utterance, corrected, truncated, null, corrections, text);
        }
        return new Prepared(utterance, text, truncated, null);
    }

    private static Resolution Rejected(ResolverState state, string utterance, string text, RejectionReason reason, string detail, bool truncated) => new()
    {
        Utterance = utterance,
        Normalized = text,
        Outcome = ResolutionOutcome.Rejected,
        Reason = reason,
        Guard = reason,
        Detail = detail,
        Truncated = truncated,
        RegistryHash = state.Registry.ContentHash,
        ModelId = state.Model.Id,
    };

    /// <summary>Steps 5–10 of the decision procedure, given the utterance's embedding.</summary>
    private Resolution Decide(ResolverState state, Prepared prepared, ReadOnlySpan<float> vector, bool embedTruncated)
    {
        var scores = ScoreTasks(state, vector, out var bestRow, out var headLookAlike);
        var candidates = TopCandidates(state, scores, bestRow, _options.Candidates);
        int best = IndexOf(state, candidates[0].TaskId);
        var task = state.Registry.Tasks[best];
        float bestScore = scores[best];
        float? margin = candidates.Count > 1 ? bestScore - candidates[1].Score : null;
        float accept = _options.AcceptOverride ?? state.Registry.AcceptFor(task);
        float marginNeeded = _options.MarginOverride ?? state.Registry.MarginFor(task);

        // Guards that do not depend on thresholds, judged against the best task.
        var words = WordStemmer.Words(prepared.Text);
        var uncovered = Uncovered(state, best, words);
        string? negation = NegationCues.Find(words);
        if (negation is not null && state.TaskNegations[best].Contains(negation)) negation = null;
        string? hazard = _options.HazardCheck ? state.Hazards.FindIn(uncovered) ?? state.Hazards.FindPossessiveTarget(words, state.Vocabulary[best]) : null;
        var (foreignWord, foreignTask) = ForeignAnchor(state, best, uncovered, scores);
        float phraseSim = Dot(state, vector, bestRow[best]);
        (float Sim, int Row) lookAlike = NearestMustReject(state, vector, best);
        bool closerToLookAlike = lookAlike.Row >= 0 && lookAlike.Sim > phraseSim;
        bool isLookAlike = closerToLookAlike || headLookAlike is not null || foreignWord is not null;
        RejectionReason guard = negation is not null ? RejectionReason.Negated
            : hazard is not null ? RejectionReason.Hazard
            : isLookAlike ? RejectionReason.LookAlike
            : RejectionReason.None;

        var result = new Resolution
        {
            Utterance = prepared.Original,
            Normalized = prepared.Normalized ?? prepared.Text,
            Outcome = ResolutionOutcome.Rejected,
            Task = task,
            Phrase = candidates[0].Phrase,
            Score = bestScore,
            Margin = margin,
            Candidates = candidates,
            Truncated = prepared.Truncated || embedTruncated,
            UncoveredWords = uncovered,
            Corrections = prepared.Corrections ?? [],
            Guard = guard,
            RegistryHash = state.Registry.ContentHash,
            ModelId = state.Model.Id,
        };

        if (bestScore < accept)
            return result with { Reason = RejectionReason.OutOfScope, Detail = $"best score {bestScore:0.000} is below the accept threshold {accept:0.000} of '{task.Id}'" };
        if (negation is not null)
            return result with { Reason = RejectionReason.Negated, NegationCue = negation, Detail = $"negation '{negation}' that the approved phrases of '{task.Id}' do not have" };
        if (hazard is not null)
            return result with { Reason = RejectionReason.Hazard, HazardWord = hazard, Detail = $"harmful word '{hazard}' is not part of the vocabulary of '{task.Id}'" };
        if (foreignWord is not null)
            return result with { Reason = RejectionReason.LookAlike, Detail = $"mixes tasks: '{foreignWord}' belongs to '{foreignTask}', not to '{task.Id}'" };
        if (headLookAlike is not null && !closerToLookAlike)
            return result with { Reason = RejectionReason.LookAlike, Detail = $"the task head gives its look-alike class probability {headLookAlike:0.000}, at least that of '{task.Id}'" };
        if (isLookAlike)
        {
            var rejectPhrase = task.MustReject[lookAlike.Row - FirstMustRejectRow(state, best)];
            return result with { Reason = RejectionReason.LookAlike, Detail = $"closer to the look-alike \"{rejectPhrase}\" ({lookAlike.Sim:0.000}) than to \"{candidates[0].Phrase}\" ({phraseSim:0.000})" };
        }
        if (margin is { } m && m < marginNeeded)
            return result with
            {
                Outcome = ResolutionOutcome.Ambiguous,
                Reason = RejectionReason.Ambiguous,
                Detail = $"'{candidates[0].TaskId}' ({bestScore:0.000}) and '{candidates[1].TaskId}' ({candidates[1].Score:0.000}) are within the margin {marginNeeded:0.000}",
            };
        // FiLM conditioning always comes from the matched approved phrase, never from the utterance itself.
        return result with { Outcome = ResolutionOutcome.Accepted, Reason = RejectionReason.None, Detail = null, Conditioning = state.Film?.Get(bestRow[best]) };
    }

    private static int IndexOf(ResolverState state, string taskId)
    {
        var tasks = state.Registry.Tasks;
        for (int i = 0; i < tasks.Count; i++) if (tasks[i].Id == taskId) return i;
        return -1;
    }

    private static string[] Uncovered(ResolverState state, int task, IReadOnlyList<string> words)
    {
        var vocab = state.Vocabulary[task];
        var result = new List<string>();
        foreach (var w in words)
        {
            if (StopWords.Contains(w) || NegationCues.Words.Contains(w) || w.All(char.IsDigit)) continue;
            if (!vocab.Contains(WordStemmer.Stem(w))) result.Add(w);
        }
        return result.ToArray();
    }

    /// <summary>
    /// An uncovered word that is another task's anchor (its object), with that task's id. To count, the word must be
    /// distinctive — in the vocabulary of at most <see cref="MaxAnchorOwners"/> tasks — and its task must be a plausible
    /// competitor, scoring within <see cref="AnchorCompetitorGap"/> of the best. Both conditions keep the rule from
    /// firing on registries whose tasks share vocabulary (measured on CLINC150: without them the rule rejected a
    /// sixth of in-scope queries).
    /// </summary>
    private static (string? Word, string? Task) ForeignAnchor(ResolverState state, int best, string[] uncovered, float[] scores)
    {
        foreach (var w in uncovered)
        {
            string stem = WordStemmer.Stem(w);
            int owners = 0;
            for (int t = 0; t < state.TaskCount; t++) if (state.Vocabulary[t].Contains(stem)) owners++;
            if (owners > MaxAnchorOwners) continue;
            for (int t = 0; t < state.TaskCount; t++)
                if (t != best && state.Anchors[t].Contains(stem) && scores[t] >= scores[best] - AnchorCompetitorGap)
                    return (w, state.Registry.Tasks[t].Id);
        }
        return (null, null);
    }

    /// <summary>Most tasks whose vocabulary may hold a word for it to count as another task's anchor.</summary>
    internal const int MaxAnchorOwners = 2;

    /// <summary>How far below the best task the anchor's task may score and still count as a competitor.</summary>
    internal const float AnchorCompetitorGap = 0.25f;

    private static float Dot(ResolverState state, ReadOnlySpan<float> vector, int row)
        => TensorPrimitives.Dot(vector, state.Phrases.AsSpan(row * state.Dimensions, state.Dimensions));

    private static int FirstMustRejectRow(ResolverState state, int task)
    {
        for (int r = 0; r < state.MustRejectTask.Length; r++) if (state.MustRejectTask[r] == task) return r;
        return -1;
    }

    private static (float Sim, int Row) NearestMustReject(ResolverState state, ReadOnlySpan<float> vector, int task)
    {
        float best = float.NegativeInfinity;
        int bestRow = -1;
        int dims = state.Dimensions;
        for (int r = 0; r < state.MustRejectTask.Length; r++)
        {
            if (state.MustRejectTask[r] != task) continue;
            float s = TensorPrimitives.Dot(vector, state.MustReject.AsSpan(r * dims, dims));
            if (s > best) { best = s; bestRow = r; }
        }
        return (best, bestRow);
    }

    /// <summary>Scores every task; <paramref name="bestRow"/> receives each task's nearest phrase row.</summary>
    private float[] ScoreTasks(ResolverState state, ReadOnlySpan<float> vector, out int[] bestRow)
        => ScoreTasks(state, vector, out bestRow, out _);

    /// <summary>
    /// Scores every task; <paramref name="bestRow"/> receives each task's nearest phrase row, and
    /// <paramref name="headLookAlike"/> the head's look-alike probability when it is at least the best task's (else null).
    /// </summary>
    private float[] ScoreTasks(ResolverState state, ReadOnlySpan<float> vector, out int[] bestRow, out float? headLookAlike)
    {
        headLookAlike = null;
        int dims = state.Dimensions, taskCount = state.TaskCount;
        var best = new float[taskCount];
        bestRow = new int[taskCount];
        Array.Fill(best, float.NegativeInfinity);
        int rows = state.PhraseTask.Length;
        var sims = new float[rows];
        var phrases = state.Phrases.AsSpan();
        for (int r = 0; r < rows; r++)
        {
            float s = TensorPrimitives.Dot(vector, phrases.Slice(r * dims, dims));
            sims[r] = s;
            int t = state.PhraseTask[r];
            if (s > best[t]) { best[t] = s; bestRow[t] = r; }
        }
        switch (state.Scoring)
        {
            case ScoringStrategy.BestPhrase:
                return best;
            case ScoringStrategy.Centroid:
            case ScoringStrategy.Blend:
                var scores = new float[taskCount];
                for (int t = 0; t < taskCount; t++)
                {
                    float c = TensorPrimitives.Dot(vector, state.Centroids.AsSpan(t * dims, dims));
                    scores[t] = state.Scoring == ScoringStrategy.Centroid ? c : 0.5f * (c + best[t]);
                }
                return scores;
            case ScoringStrategy.TopK:
                var topk = new float[taskCount];
                int start = 0;
                for (int t = 0; t < taskCount; t++)
                {
                    int end = start;
                    while (end < rows && state.PhraseTask[end] == t) end++;
                    var slice = sims.AsSpan(start, end - start).ToArray();
                    Array.Sort(slice);
                    int k = Math.Min(_options.TopK, slice.Length);
                    topk[t] = k == 0 ? float.NegativeInfinity : TensorPrimitives.Sum(slice.AsSpan(slice.Length - k)) / k;
                    start = end;
                }
                return topk;
            case ScoringStrategy.Whitened:
                var whitened = new float[taskCount];
                state.Whitening!.ScoreTasks(vector, whitened);
                return whitened;
            case ScoringStrategy.Head:
                var head = new float[taskCount];
                float reject = state.Head!.ScoreTasks(vector, head, out float bestProbability);
                if (state.Head.HasRejectClass && reject >= bestProbability) headLookAlike = reject;
                return head;
            default:
                throw new InvalidOperationException($"Unknown scoring strategy {state.Scoring}.");
        }
    }

    private static IReadOnlyList<TaskCandidate> TopCandidates(ResolverState state, float[] scores, int[] bestRow, int count)
    {
        var order = Enumerable.Range(0, scores.Length).OrderByDescending(t => scores[t]).ThenBy(t => t).Take(count);
        var list = new List<TaskCandidate>();
        foreach (int t in order)
        {
            var task = state.Registry.Tasks[t];
            list.Add(new TaskCandidate(task.Id, task.Phrases[state.PhraseOrdinal[bestRow[t]]], scores[t]));
        }
        return list;
    }
}
