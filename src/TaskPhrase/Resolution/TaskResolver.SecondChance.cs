using System.Runtime.CompilerServices;
using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

public sealed partial class TaskResolver
{
    /// <summary>A rewrite of a rejected utterance, prepared for resolving, with the swaps and dropped courtesy words that made it.</summary>
    private readonly record struct Retry(Prepared Prepared, IReadOnlyList<(string From, string To)> Swaps, IReadOnlyList<string> Dropped);

    /// <summary>Per registry state: exact-match keys of the approved phrases without their edge courtesy words (−1: two tasks share one).</summary>
    private static readonly ConditionalWeakTable<ResolverState, Dictionary<string, int>> TrimmedExact = new();

    /// <summary>
    /// The second chance for an out-of-scope rejection (<see cref="ResolverOptions.SecondChance"/>): the rewrite with
    /// sound-alike registry words swapped in and edge courtesy words dropped ("… thanks"), or null when the option is
    /// off, the result was not an out-of-scope rejection or there is nothing to rewrite. A trimmed rewrite that equals
    /// an approved phrase without its own courtesy words ("collect the post" for "collect the post please") is resolved
    /// as an exact match of that phrase.
    /// </summary>
    private Retry? ProposeRetry(ResolverState state, Prepared first, Resolution result)
    {
        if (!_options.SecondChance || result.Outcome != ResolutionOutcome.Rejected || result.Reason != RejectionReason.OutOfScope)
            return null;
        var swapped = SoundsLikeCorrector.Propose(first.Text, state.Words, state.WordList, state.Hazards);
        string text = swapped?.Text ?? first.Text;
        var trimmed = CourtesyTrim.Trim(text);
        if (swapped is null && trimmed is null) return null;
        string rewrite = trimmed?.Text ?? text;
        var prepared = Prepare(state, rewrite);
        if (prepared.Early is null && trimmed is not null
            && TrimmedExact.GetValue(state, BuildTrimmedExact).TryGetValue(TextNormalizer.MatchKey(rewrite), out int row) && row >= 0)
        {
            var task = state.Registry.Tasks[state.PhraseTask[row]];
            prepared = Prepare(state, task.Phrases[state.PhraseOrdinal[row]]);
        }
        return new Retry(prepared, swapped?.Swaps ?? [], trimmed?.Dropped ?? []);
    }

    private static Dictionary<string, int> BuildTrimmedExact(ResolverState state)
    {
        var keys = new Dictionary<string, int>(StringComparer.Ordinal);
        for (int row = 0; row < state.PhraseTask.Length; row++)
        {
            string phrase = state.Registry.Tasks[state.PhraseTask[row]].Phrases[state.PhraseOrdinal[row]];
            if (CourtesyTrim.Trim(phrase) is not { } t) continue;
            string key = TextNormalizer.MatchKey(t.Text);
            if (keys.TryGetValue(key, out int other) && (other < 0 || state.PhraseTask[other] != state.PhraseTask[row])) keys[key] = -1;
            else keys.TryAdd(key, row);
        }
        return keys;
    }

    /// <summary>Resolves a retry on the calling thread (one more forward pass unless the rewrite is an exact match).</summary>
    private Resolution ResolveRetry(ResolverState state, Retry retry)
    {
        if (retry.Prepared.Early is { } early) return early;
        var vector = new float[state.Dimensions];
        bool truncated = EmbedOne(retry.Prepared.Text, vector);
        return Decide(state, retry.Prepared, vector, truncated);
    }

    /// <summary>
    /// Keeps the rewrite's resolution only when it is a clear acceptance: accepted, scoring at least the task's accept
    /// threshold plus <see cref="ResolverOptions.SecondChanceLift"/>, and every swapped-in word in the accepted task's own
    /// vocabulary (a slip is only repaired toward the task it then selects). Otherwise the original rejection stands.
    /// </summary>
    private Resolution KeepIfClear(ResolverState state, Prepared first, Resolution original, Retry retry, Resolution second)
    {
        if (second.Outcome != ResolutionOutcome.Accepted || second.Task is not { } task) return original;
        float accept = _options.AcceptOverride ?? state.Registry.AcceptFor(task);
        if (second.Score < accept + _options.SecondChanceLift) return original;
        var vocabulary = state.Vocabulary[TaskPosition(state, task)];
        foreach (var (_, to) in retry.Swaps)
            if (!vocabulary.Contains(WordStemmer.Stem(to))) return original;

        var corrections = new List<string>(first.Corrections ?? []);
        foreach (var (from, to) in retry.Swaps) corrections.Add($"{from} → {to} (sounds alike)");
        foreach (var c in second.Corrections) if (!corrections.Contains(c)) corrections.Add(c);
        var how = new List<string>(2);
        if (retry.Swaps.Count > 0) how.Add($"swapping sound-alike words ({string.Join(", ", retry.Swaps.Select(s => $"{s.From} → {s.To}"))})");
        if (retry.Dropped.Count > 0) how.Add($"dropping courtesy words ({string.Join(", ", retry.Dropped.Select(d => $"'{d}'"))})");
        return second with
        {
            Utterance = first.Original,
            Normalized = first.Normalized ?? first.Text,
            Truncated = second.Truncated || first.Truncated,
            Corrections = corrections,
            Detail = $"{second.Detail} after {string.Join(" and ", how)}",
        };
    }

    /// <summary>Second chances for the out-of-scope rejections among <paramref name="embedded"/>, the rewrites embedded in one batch.</summary>
    private async Task RetryOutOfScopeAsync(ResolverState state, Prepared[] prepared, Resolution[] results, List<int> embedded,
        CancellationToken cancellationToken)
    {
        var retries = new List<(int Index, Retry Retry)>();
        foreach (int i in embedded)
            if (ProposeRetry(state, prepared[i], results[i]) is { } retry) retries.Add((i, retry));
        if (retries.Count == 0) return;

        var second = new Resolution[retries.Count];
        await DecideAllAsync(state, retries.Select(r => r.Retry.Prepared).ToArray(), second, cancellationToken).ConfigureAwait(false);
        for (int k = 0; k < retries.Count; k++)
        {
            var (i, retry) = retries[k];
            results[i] = KeepIfClear(state, prepared[i], results[i], retry, second[k]);
        }
    }

    private static int TaskPosition(ResolverState state, Registry.TaskDefinition task)
    {
        var tasks = state.Registry.Tasks;
        for (int i = 0; i < tasks.Count; i++) if (ReferenceEquals(tasks[i], task) || tasks[i].Id == task.Id) return i;
        throw new InvalidOperationException($"Task '{task.Id}' is not in the resolver's registry.");
    }
}
