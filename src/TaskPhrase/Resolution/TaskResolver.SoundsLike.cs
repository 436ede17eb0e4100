using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

public sealed partial class TaskResolver
{
    /// <summary>A sound-alike rewrite of a rejected utterance, prepared for resolving, with the swaps that made it.</summary>
    private readonly record struct Retry(Prepared Prepared, IReadOnlyList<(string From, string To)> Swaps);

    /// <summary>
    /// The second chance for an out-of-scope rejection (<see cref="ResolverOptions.SoundsLikeRetry"/>): the rewrite with
    /// sound-alike registry words swapped in, or null when the option is off, the result was not an out-of-scope
    /// rejection or no word has a sound-alike.
    /// </summary>
    private Retry? ProposeRetry(ResolverState state, Prepared first, Resolution result)
    {
        if (!_options.SoundsLikeRetry || result.Outcome != ResolutionOutcome.Rejected || result.Reason != RejectionReason.OutOfScope)
            return null;
        var proposal = SoundsLikeCorrector.Propose(first.Text, state.Words, state.WordList, state.Hazards);
        if (proposal is not { } p) return null;
        return new Retry(Prepare(state, p.Text), p.Swaps);
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
    /// threshold plus <see cref="ResolverOptions.SoundsLikeLift"/>, and every swapped-in word in the accepted task's own
    /// vocabulary (a slip is only repaired toward the task it then selects). Otherwise the original rejection stands.
    /// </summary>
    private Resolution KeepIfClear(ResolverState state, Prepared first, Resolution original, Retry retry, Resolution second)
    {
        if (second.Outcome != ResolutionOutcome.Accepted || second.Task is not { } task) return original;
        float accept = _options.AcceptOverride ?? state.Registry.AcceptFor(task);
        if (second.Score < accept + _options.SoundsLikeLift) return original;
        var vocabulary = state.Vocabulary[IndexOf(state, task.Id)];
        foreach (var (_, to) in retry.Swaps)
            if (!vocabulary.Contains(WordStemmer.Stem(to))) return original;

        var corrections = new List<string>(first.Corrections ?? []);
        foreach (var (from, to) in retry.Swaps) corrections.Add($"{from} → {to} (sounds alike)");
        foreach (var c in second.Corrections) if (!corrections.Contains(c)) corrections.Add(c);
        string swaps = string.Join(", ", retry.Swaps.Select(s => $"{s.From} → {s.To}"));
        return second with
        {
            Utterance = first.Original,
            Normalized = first.Normalized ?? first.Text,
            Truncated = second.Truncated || first.Truncated,
            Corrections = corrections,
            Detail = $"{second.Detail} after swapping sound-alike words ({swaps})",
        };
    }

    /// <summary>Second chances for the out-of-scope rejections among <paramref name="embedded"/>, the rewrites embedded in one batch.</summary>
    private async Task RetrySoundAlikesAsync(ResolverState state, Prepared[] prepared, Resolution[] results, List<int> embedded,
        CancellationToken cancellationToken)
    {
        var retries = new List<(int Index, Retry Retry)>();
        foreach (int i in embedded)
            if (ProposeRetry(state, prepared[i], results[i]) is { } retry) retries.Add((i, retry));
        if (retries.Count == 0) return;

        var second = new Resolution[retries.Count];
        var toEmbed = new List<int>();
        for (int k = 0; k < retries.Count; k++)
        {
            if (retries[k].Retry.Prepared.Early is { } early) second[k] = early;
            else toEmbed.Add(k);
        }
        if (toEmbed.Count > 0)
        {
            var embeddings = await _generator.GenerateAsync(toEmbed.Select(k => retries[k].Retry.Prepared.Text).ToList(), null, cancellationToken)
                .ConfigureAwait(false);
            for (int j = 0; j < toEmbed.Count; j++)
            {
                int k = toEmbed[j];
                var e = embeddings[j];
                CheckWidth(e.Vector.Length, state.Dimensions);
                bool truncated = e.AdditionalProperties?.TryGetValue("truncated", out var t) == true && t is true;
                second[k] = Decide(state, retries[k].Retry.Prepared, e.Vector.Span, truncated);
            }
        }
        for (int k = 0; k < retries.Count; k++)
        {
            var (i, retry) = retries[k];
            results[i] = KeepIfClear(state, prepared[i], results[i], retry, second[k]);
        }
    }
}
