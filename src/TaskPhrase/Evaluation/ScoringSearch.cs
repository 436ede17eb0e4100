using Microsoft.Extensions.AI;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Evaluation;

/// <summary>
/// The joint search of <c>taskphrase tune</c>: for each scoring setting (strategy and its parameters) the probe suite
/// is resolved by a resolver built exactly as the tuned registry would build it, and <see cref="ThresholdTuner"/>
/// chooses the accept threshold, margin and per-task overrides for that setting; the setting with the most in-scope
/// probes accepted as expected within both budgets wins.
/// </summary>
/// <remarks>
/// <para>Every text (approved phrases, look-alikes, probes) is embedded once and remembered, so each further setting
/// costs one scoring pass over the suite, plus a training for each head L2 value (settings that differ only in the
/// head's temperature share one trained head). The scored suite of every setting is a full resolution, guards
/// included, so the figures are the ones the tuned registry gives on the suite.</para>
/// <para>Choice: a feasible setting beats an infeasible one; among feasible ones more correct acceptances win, among
/// infeasible ones the smaller budget violation; remaining ties go to the setting tried first (the candidate order, so
/// the default grid prefers the built-in centroid and simpler strategies). Deterministic: same registry, suite,
/// model and candidates give the same choice.</para>
/// </remarks>
public static class ScoringSearch
{
    /// <summary>Runs the search.</summary>
    /// <param name="registry">The registry to tune (its own scoring key is ignored: the candidates replace it).</param>
    /// <param name="generator">Embedding generator of the registry's model.</param>
    /// <param name="cases">The tuning suite; needs in-scope and out-of-scope probes.</param>
    /// <param name="budgets">False-accept and wrong-task budgets.</param>
    /// <param name="candidates">Settings to try, in preference order for ties (see <see cref="ScoringCandidate.DefaultGrid"/>).</param>
    /// <param name="tuner">The threshold tuner; null for the default.</param>
    /// <param name="progress">Called before each setting is scored and after it is tuned; may be null.</param>
    /// <param name="cancellationToken">Cancels between settings and during embedding.</param>
    /// <exception cref="ArgumentNullException">An argument is null.</exception>
    /// <exception cref="ArgumentException">No candidates, or the suite lacks in-scope or out-of-scope probes.</exception>
    public static ScoringSearchResult Run(TaskRegistry registry, IEmbeddingGenerator<string, Embedding<float>> generator, IReadOnlyList<ProbeCase> cases,
        TuningBudgets budgets, IReadOnlyList<ScoringCandidate> candidates, ThresholdTuner? tuner = null,
        Action<ScoringSearchProgress>? progress = null, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(registry);
        ArgumentNullException.ThrowIfNull(generator);
        ArgumentNullException.ThrowIfNull(cases);
        ArgumentNullException.ThrowIfNull(budgets);
        ArgumentNullException.ThrowIfNull(candidates);
        if (candidates.Count == 0) throw new ArgumentException("The search needs at least one scoring setting to try.", nameof(candidates));
        tuner ??= new ThresholdTuner();
        var memo = new MemoizingEmbeddingGenerator(generator);
        var texts = cases.Select(c => c.Utterance).ToList();
        var heads = new Dictionary<(double? Shrinkage, double L2), TaskResolver>();
        var outcomes = new List<ScoringSearchOutcome>(candidates.Count);
        int chosen = -1;
        for (int i = 0; i < candidates.Count; i++)
        {
            cancellationToken.ThrowIfCancellationRequested();
            var candidate = candidates[i];
            progress?.Invoke(new ScoringSearchProgress(i, candidates.Count, candidate, null));
            var resolver = ResolverFor(candidate, registry, memo, heads, cancellationToken);
            var resolutions = resolver.ResolveManyAsync(texts, cancellationToken).GetAwaiter().GetResult();
            var scored = cases.Select((c, k) => ScoredProbe.From(c, resolutions[k])).ToList();
            var result = tuner.TuneForBudgets(scored, budgets) with { Scoring = candidate };
            outcomes.Add(new ScoringSearchOutcome(candidate, result));
            if (chosen < 0 || IsBetter(result, outcomes[chosen].Result)) chosen = i;
            progress?.Invoke(new ScoringSearchProgress(i, candidates.Count, candidate, result));
        }
        return new ScoringSearchResult(outcomes[chosen].Candidate, outcomes[chosen].Result, outcomes.AsReadOnly());
    }

    /// <summary>Strictly better: feasible first, then more correct acceptances (feasible) or a smaller violation (infeasible), then more correct.</summary>
    internal static bool IsBetter(TuningResult a, TuningResult b)
    {
        if (a.Feasible != b.Feasible) return a.Feasible;
        if (!a.Feasible && a.Violation != b.Violation) return a.Violation < b.Violation;
        return a.Metrics.InScopeAccuracy.Count > b.Metrics.InScopeAccuracy.Count;
    }

    private static TaskResolver ResolverFor(ScoringCandidate candidate, TaskRegistry registry, MemoizingEmbeddingGenerator memo,
        Dictionary<(double?, double), TaskResolver> heads, CancellationToken ct)
    {
        var tuned = candidate.Apply(registry);
        if (candidate.ToStrategy() != ScoringStrategy.Head)
            return TaskResolver.CreateAsync(tuned, memo, null, ct).GetAwaiter().GetResult();
        // The temperature and the probability weight act at resolve time only: one training per (shrinkage, L2).
        var learned = RegistryScoring.LearnedFor(tuned);
        var key = (candidate.Parameters?.Shrinkage, learned.L2);
        if (!heads.TryGetValue(key, out var trained))
        {
            trained = TaskResolver.CreateAsync(tuned, memo, null, ct).GetAwaiter().GetResult();
            heads[key] = trained;
            return trained;
        }
        return trained.WithHead(trained.Head!.WithTemperature(learned.Temperature).WithProbabilityWeight(learned.ProbabilityWeight));
    }
}

/// <summary>The outcome of <see cref="ScoringSearch.Run"/>. Immutable.</summary>
/// <param name="Chosen">The winning scoring setting.</param>
/// <param name="Result">Its tuning (thresholds, figures on the suite; <see cref="TuningResult.Scoring"/> is <paramref name="Chosen"/>).</param>
/// <param name="Outcomes">Every setting tried, in the order tried, with its own best tuning.</param>
public sealed record ScoringSearchResult(ScoringCandidate Chosen, TuningResult Result, IReadOnlyList<ScoringSearchOutcome> Outcomes);

/// <summary>One setting of a <see cref="ScoringSearch"/> and the best thresholds found for it.</summary>
/// <param name="Candidate">The scoring setting.</param>
/// <param name="Result">Its tuning on the suite.</param>
public sealed record ScoringSearchOutcome(ScoringCandidate Candidate, TuningResult Result);

/// <summary>Progress of a <see cref="ScoringSearch"/>.</summary>
/// <param name="Index">Zero-based position of the setting.</param>
/// <param name="Count">How many settings the search tries.</param>
/// <param name="Candidate">The setting.</param>
/// <param name="Result">Null when the setting is about to be scored; its tuning once done.</param>
public sealed record ScoringSearchProgress(int Index, int Count, ScoringCandidate Candidate, TuningResult? Result);
