using System.Buffers;
using System.Numerics.Tensors;
using TaskPhrase.Conditioning;
using TaskPhrase.Embedding;
using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

public sealed partial class TaskResolver
{
    /// <summary>An utterance after the steps that need no model: normalisation, empty, exact match, unintelligible.</summary>
    /// <remarks><c>Text</c> is what is embedded and checked (typo corrections applied); <c>Normalized</c> the normalised input.</remarks>
    private readonly record struct Prepared(string Original, string Text, bool Truncated, Resolution? Early, IReadOnlyList<string>? Corrections = null, string? Normalized = null);

    /// <summary>Longest plain-ASCII match key built on the stack; longer input builds it as a string.</summary>
    private const int MaxStackKey = 512;

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
        // The match key of plain ASCII text (nearly every typed or transcribed command) is built on the stack; other
        // text takes the full Unicode route. Either way it is computed once.
        Span<char> keyBuffer = stackalloc char[MaxStackKey];
        int keyLength = TextNormalizer.PlainMatchKey(text, keyBuffer);
        string? fullKey = keyLength < 0 ? TextNormalizer.MatchKey(text) : null;
        ReadOnlySpan<char> key = fullKey ?? (ReadOnlySpan<char>)keyBuffer[..keyLength];
        if (text.Length == 0 || key.Length == 0 && !text.Any(char.IsLetterOrDigit))
        {
            var reason = text.Length == 0 ? RejectionReason.Empty : RejectionReason.Unintelligible;
            string detail = text.Length == 0 ? "nothing left after normalisation" : "no letters or digits";
            return new Prepared(utterance, text, truncated, Rejected(state, utterance, text, reason, detail, truncated));
        }
        if (state.Exact.GetAlternateLookup<ReadOnlySpan<char>>().TryGetValue(key, out int row))
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
        int taskCount = state.TaskCount;
        float[]? pooledScores = null;
        int[]? pooledRows = null;
        Span<float> scores = taskCount <= MaxStackTasks ? stackalloc float[taskCount] : (pooledScores = ArrayPool<float>.Shared.Rent(taskCount)).AsSpan(0, taskCount);
        Span<int> rows = taskCount <= MaxStackTasks ? stackalloc int[taskCount] : (pooledRows = ArrayPool<int>.Shared.Rent(taskCount)).AsSpan(0, taskCount);
        try
        {
            return Decide(state, prepared, vector, embedTruncated, scores, rows);
        }
        finally
        {
            ReturnPooled(pooledScores, pooledRows);
        }
    }

    private Resolution Decide(ResolverState state, Prepared prepared, ReadOnlySpan<float> vector, bool embedTruncated, Span<float> scores, Span<int> rows)
    {
        float? headLookAlike = ScoreTasks(state, vector, _options.Candidates, scores, rows);
        var candidates = TopCandidates(state, vector, scores, rows, _options.Candidates, out int best);
        var task = state.Registry.Tasks[best];
        float bestScore = scores[best];
        int bestRow = rows[best];
        float? margin = candidates.Length > 1 ? bestScore - candidates[1].Score : null;
        float accept = _options.AcceptOverride ?? state.Registry.AcceptFor(task);
        float marginNeeded = _options.MarginOverride ?? state.Registry.MarginFor(task);

        // Guards that do not depend on thresholds, judged against the best task. Words are spans over one pooled
        // lower-cased copy; strings are made only for uncovered words and for what a guard reports.
        using var words = new WordSpans(prepared.Text);
        var uncovered = Uncovered(state, best, words);
        string? negation = NegationCues.Find(words);
        if (negation is not null && state.TaskNegations[best].Contains(negation)) negation = null;
        string? hazard = _options.HazardCheck ? state.Hazards.FindIn(uncovered) ?? state.Hazards.FindPossessiveTarget(words, state.Vocabulary[best]) : null;
        var (foreignWord, foreignTask) = ForeignAnchor(state, vector, best, uncovered, scores, rows);
        float phraseSim = Dot(state, vector, bestRow);
        (float Sim, int Row) lookAlike = NearestMustReject(state, vector, best);
        bool closerToLookAlike = lookAlike.Row >= 0 && lookAlike.Sim > phraseSim;
        bool isLookAlike = closerToLookAlike || headLookAlike is not null || foreignWord is not null;
        RejectionReason guard = negation is not null ? RejectionReason.Negated
            : hazard is not null ? RejectionReason.Hazard
            : isLookAlike ? RejectionReason.LookAlike
            : RejectionReason.None;

        // The first rule that applies decides; the resolution is then made once, with every field in place.
        var outcome = ResolutionOutcome.Rejected;
        RejectionReason reason;
        string? detail, negationCue = null, hazardWord = null;
        FilmConditioning? conditioning = null;
        if (bestScore < accept)
        {
            reason = RejectionReason.OutOfScope;
            detail = $"best score {bestScore:0.000} is below the accept threshold {accept:0.000} of '{task.Id}'";
        }
        else if (negation is not null)
        {
            reason = RejectionReason.Negated;
            negationCue = negation;
            detail = $"negation '{negation}' that the approved phrases of '{task.Id}' do not have";
        }
        else if (hazard is not null)
        {
            reason = RejectionReason.Hazard;
            hazardWord = hazard;
            detail = $"harmful word '{hazard}' is not part of the vocabulary of '{task.Id}'";
        }
        else if (foreignWord is not null)
        {
            reason = RejectionReason.LookAlike;
            detail = $"mixes tasks: '{foreignWord}' belongs to '{foreignTask}', not to '{task.Id}'";
        }
        else if (headLookAlike is not null && !closerToLookAlike)
        {
            reason = RejectionReason.LookAlike;
            detail = $"the task head gives its look-alike class probability {headLookAlike:0.000}, at least that of '{task.Id}'";
        }
        else if (isLookAlike)
        {
            var rejectPhrase = task.MustReject[lookAlike.Row - FirstMustRejectRow(state, best)];
            reason = RejectionReason.LookAlike;
            detail = $"closer to the look-alike \"{rejectPhrase}\" ({lookAlike.Sim:0.000}) than to \"{candidates[0].Phrase}\" ({phraseSim:0.000})";
        }
        else if (margin is { } m && m < marginNeeded)
        {
            outcome = ResolutionOutcome.Ambiguous;
            reason = RejectionReason.Ambiguous;
            detail = $"'{candidates[0].TaskId}' ({bestScore:0.000}) and '{candidates[1].TaskId}' ({candidates[1].Score:0.000}) are within the margin {marginNeeded:0.000}";
        }
        else
        {
            outcome = ResolutionOutcome.Accepted;
            reason = RejectionReason.None;
            detail = null;
            // FiLM conditioning always comes from the matched approved phrase, never from the utterance itself.
            conditioning = state.Film?.Get(bestRow);
        }

        return new Resolution
        {
            Utterance = prepared.Original,
            Normalized = prepared.Normalized ?? prepared.Text,
            Outcome = outcome,
            Reason = reason,
            Detail = detail,
            Task = task,
            Phrase = candidates[0].Phrase,
            Score = bestScore,
            Margin = margin,
            Candidates = candidates,
            Truncated = prepared.Truncated || embedTruncated,
            UncoveredWords = uncovered,
            Corrections = prepared.Corrections ?? [],
            HazardWord = hazardWord,
            Guard = guard,
            NegationCue = negationCue,
            Conditioning = conditioning,
            RegistryHash = state.Registry.ContentHash,
            ModelId = state.Model.Id,
        };
    }

    /// <summary>The words not covered by the task's vocabulary (stop words, negation cues and numbers aside), as strings.</summary>
    private static string[] Uncovered(ResolverState state, int task, in WordSpans words)
    {
        var vocab = state.Vocabulary[task].GetAlternateLookup<ReadOnlySpan<char>>();
        Span<int> kept = words.Count <= 128 ? stackalloc int[words.Count] : new int[words.Count];
        int count = 0;
        for (int i = 0; i < words.Count; i++)
        {
            var w = words[i];
            if (StopWords.Contains(w) || NegationCues.IsWord(w) || IsDigits(w)) continue;
            if (!vocab.Contains(WordStemmer.StemSpan(w))) kept[count++] = i;
        }
        if (count == 0) return [];
        var result = new string[count];
        for (int k = 0; k < count; k++) result[k] = new string(words[kept[k]]);
        return result;

        static bool IsDigits(ReadOnlySpan<char> word)
        {
            foreach (char c in word)
                if (!char.IsDigit(c)) return false;
            return true;
        }
    }

    /// <summary>
    /// An uncovered word that is another task's anchor (its object), with that task's id. To count, the word must be
    /// distinctive — in the vocabulary of at most <see cref="MaxAnchorOwners"/> tasks — and its task must be a plausible
    /// competitor, scoring within <see cref="AnchorCompetitorGap"/> of the best. Both conditions keep the rule from
    /// firing on registries whose tasks share vocabulary (measured on CLINC150: without them the rule rejected a
    /// sixth of in-scope queries).
    /// </summary>
    /// <remarks>A competitor the phrase screen left unscored (row <see cref="NotScored"/>) is scored exactly here first.</remarks>
    private static (string? Word, string? Task) ForeignAnchor(ResolverState state, ReadOnlySpan<float> vector, int best, string[] uncovered, Span<float> scores, Span<int> rows)
    {
        foreach (var w in uncovered)
        {
            // The stem span stays valid through both loops: nothing in them stems.
            var stem = WordStemmer.StemSpan(w);
            int owners = 0;
            for (int t = 0; t < state.TaskCount; t++) if (state.Vocabulary[t].GetAlternateLookup<ReadOnlySpan<char>>().Contains(stem)) owners++;
            if (owners > MaxAnchorOwners) continue;
            for (int t = 0; t < state.TaskCount; t++)
            {
                if (t == best || !state.Anchors[t].GetAlternateLookup<ReadOnlySpan<char>>().Contains(stem)) continue;
                if (rows[t] == NotScored) scores[t] = ExactScore(state, vector, t, out rows[t]);
                if (scores[t] >= scores[best] - AnchorCompetitorGap) return (w, state.Registry.Tasks[t].Id);
            }
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

    /// <summary>Scores every task and returns the top <paramref name="count"/> candidates (see <see cref="Rank"/>).</summary>
    private IReadOnlyList<TaskCandidate> RankCandidates(ResolverState state, ReadOnlySpan<float> vector, int count)
    {
        int taskCount = state.TaskCount;
        float[]? pooledScores = null;
        int[]? pooledRows = null;
        Span<float> scores = taskCount <= MaxStackTasks ? stackalloc float[taskCount] : (pooledScores = ArrayPool<float>.Shared.Rent(taskCount)).AsSpan(0, taskCount);
        Span<int> rows = taskCount <= MaxStackTasks ? stackalloc int[taskCount] : (pooledRows = ArrayPool<int>.Shared.Rent(taskCount)).AsSpan(0, taskCount);
        try
        {
            ScoreTasks(state, vector, count, scores, rows);
            return TopCandidates(state, vector, scores, rows, count, out _);
        }
        finally
        {
            ReturnPooled(pooledScores, pooledRows);
        }
    }
}
