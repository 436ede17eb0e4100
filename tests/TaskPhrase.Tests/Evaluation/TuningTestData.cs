using CsCheck;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>Synthetic scored probes for the tuning tests, and small builders for hand-made ones.</summary>
internal static class TuningTestData
{
    public static readonly string[] Tasks = ["hall-light", "keys-hook", "water-basil"];

    public static ScoredProbe InScope(string expect, string best, float score, string? runnerUp = null, float runnerUpScore = 0,
        bool guard = false, bool exact = false)
        => new(new ProbeCase($"probe {expect} {score}", expect), best, score, runnerUp, runnerUpScore, guard, exact);

    public static ScoredProbe OutOfScope(string best, float score, string? runnerUp = null, float runnerUpScore = 0,
        bool guard = false, bool exact = false)
        => new(new ProbeCase($"probe reject {score}", ProbeCase.Reject), best, score, runnerUp, runnerUpScore, guard, exact);

    /// <summary>
    /// One random probe. Scores are quantised to 0.01 and runner-up distances to 0.005 so that ties between
    /// scores and gaps that sit on the margin grid occur often (the edge cases of a threshold search).
    /// </summary>
    public static readonly Gen<ScoredProbe> Probe =
        Gen.Select(Gen.Int[0, 9], Gen.Int[0, 2], Gen.Int[0, 2], Gen.Int[30, 95], Gen.Int[0, 30], Gen.Int[0, 19])
            .Select((inScopeDraw, expect, best, score100, gap200, flags) =>
            {
                bool inScope = inScopeDraw < 6;
                // In-scope probes mostly score their own task best.
                string bestTask = inScope && best != 2 ? Tasks[expect] : Tasks[(expect + best) % 3];
                float score = score100 / 100f;
                bool hasRunnerUp = flags != 0;
                string? runnerUp = hasRunnerUp ? Tasks.First(t => t != bestTask) : null;
                float runnerUpScore = hasRunnerUp ? Math.Max(0f, score - gap200 * 0.005f) : 0f;
                bool guard = flags == 1 || flags == 2;
                bool exact = flags == 3 && inScopeDraw % 2 == 0;
                var probe = new ProbeCase($"synthetic {inScopeDraw}{expect}{best}{score100}{gap200}{flags}", inScope ? Tasks[expect] : ProbeCase.Reject);
                return new ScoredProbe(probe, bestTask, exact ? 1f : score, runnerUp, runnerUpScore, guard, exact);
            });

    /// <summary>A random suite with at least one in-scope and one out-of-scope probe.</summary>
    public static readonly Gen<ScoredProbe[]> Suite =
        Gen.Select(Probe.Array[1, 60], Gen.Int[30, 95], Gen.Int[30, 95]).Select((rest, a, b) =>
            new[] { InScope(Tasks[0], Tasks[0], a / 100f), OutOfScope(Tasks[1], b / 100f) }.Concat(rest).ToArray());

    public static readonly Gen<TuningBudgets> Budgets =
        Gen.Select(Gen.Int[0, 5], Gen.Int[0, 4]).Select((fa, wt) =>
            new TuningBudgets(new[] { 0.0, 0.05, 0.1, 0.2, 0.5, 1.0 }[fa], wt == 4 ? null : new[] { 0.0, 0.02, 0.05, 0.1 }[wt]));
}
