using System.Globalization;

namespace TaskPhrase.Evaluation;

public sealed partial class ThresholdTuner
{
    /// <summary>Largest table (states × options) the override search fills before giving up.</summary>
    private const long MaxOverrideWork = 50_000_000;

    /// <summary>One choice for a task's accept threshold and what it yields on the probes nearest that task.</summary>
    private readonly record struct OverrideOption(float Accept, bool IsOverride, int Correct, int Wrong, int FalseAccept);

    /// <summary>
    /// Per-task accept overrides on top of the chosen global setting (see <see cref="TuneForBudgets"/> remarks):
    /// an exact multiple-choice search over the eligible tasks' thresholds, keeping the suite-wide budgets.
    /// </summary>
    private Dictionary<string, float> ChooseOverrides(IReadOnlyList<ScoredProbe> probes, Prepared prepared, TuningBudgets budgets,
        Setting global, List<string> notes)
    {
        var result = new Dictionary<string, float>(StringComparer.Ordinal);
        var expecting = new Dictionary<string, int>(StringComparer.Ordinal);
        foreach (var p in probes)
        {
            if (p.Probe.IsInScope) expecting[p.Probe.Expect] = expecting.GetValueOrDefault(p.Probe.Expect) + 1;
        }
        var nearest = new Dictionary<string, List<LiveProbe>>(StringComparer.Ordinal);
        foreach (var l in prepared.Live)
        {
            if (!nearest.TryGetValue(l.Task, out var list)) nearest[l.Task] = list = [];
            list.Add(l); // stays in descending score order
        }

        var eligible = new List<string>();
        foreach (var (task, count) in expecting.OrderBy(e => e.Key, StringComparer.Ordinal))
        {
            if (count < Options.MinProbesForOverride)
            {
                notes.Add(string.Create(CultureInfo.InvariantCulture,
                    $"Task '{task}' has {count} in-scope probes, fewer than {Options.MinProbesForOverride}: no per-task override considered."));
            }
            else if (nearest.ContainsKey(task))
            {
                eligible.Add(task);
            }
        }
        if (eligible.Count == 0) return result;

        var groups = eligible.Select(t => OptionsFor(nearest[t], global, budgets)).ToArray();
        int faAllowed = MaxAllowed(c => budgets.AllowsFalseAccepts(c, prepared.OutOfScope), prepared.OutOfScope);
        bool capWrong = budgets.MaxWrongTask is not null;
        int wrongAllowed = capWrong ? MaxAllowed(c => budgets.AllowsWrongTask(c, prepared.InScope), prepared.InScope) : 0;
        // What the eligible tasks may use: the allowance minus what everything else contributes at the global setting.
        int fCap = faAllowed - (global.FalseAccept - groups.Sum(g => g[0].FalseAccept));
        int wCap = capWrong ? wrongAllowed - (global.Wrong - groups.Sum(g => g[0].Wrong)) : 0;
        fCap = Math.Min(fCap, groups.Sum(g => g.Max(o => o.FalseAccept)));
        if (capWrong) wCap = Math.Min(wCap, groups.Sum(g => g.Max(o => o.Wrong)));
        if (fCap < 0 || wCap < 0) return result; // cannot happen for a feasible global setting

        int width = wCap + 1;
        long states = (long)(fCap + 1) * width;
        long work = states * groups.Sum(g => (long)g.Length);
        if (work > MaxOverrideWork)
        {
            notes.Add(string.Create(CultureInfo.InvariantCulture,
                $"Per-task overrides were not searched: the table would need {work} steps (limit {MaxOverrideWork})."));
            return result;
        }

        // dp over exact (false accepts, wrong) used by the eligible tasks: most correct, then fewest overrides.
        var correct = new int[states];
        var overrides = new int[states];
        Array.Fill(correct, -1);
        correct[0] = 0;
        var choice = new int[groups.Length][];
        for (int g = 0; g < groups.Length; g++)
        {
            var nextCorrect = new int[states];
            var nextOverrides = new int[states];
            Array.Fill(nextCorrect, -1);
            var pick = new int[states];
            for (long s = 0; s < states; s++)
            {
                if (correct[s] < 0) continue;
                int f = (int)(s / width), w = (int)(s % width);
                for (int o = 0; o < groups[g].Length; o++)
                {
                    var opt = groups[g][o];
                    int f2 = f + opt.FalseAccept, w2 = capWrong ? w + opt.Wrong : 0;
                    if (f2 > fCap || w2 > wCap) continue;
                    long s2 = (long)f2 * width + w2;
                    int c2 = correct[s] + opt.Correct, o2 = overrides[s] + (opt.IsOverride ? 1 : 0);
                    if (c2 > nextCorrect[s2] || (c2 == nextCorrect[s2] && o2 < nextOverrides[s2]))
                    {
                        nextCorrect[s2] = c2;
                        nextOverrides[s2] = o2;
                        pick[s2] = o;
                    }
                }
            }
            correct = nextCorrect;
            overrides = nextOverrides;
            choice[g] = pick;
        }

        long bestState = -1;
        for (long s = 0; s < states; s++)
        {
            if (correct[s] < 0) continue;
            if (bestState < 0 || correct[s] > correct[bestState]
                || (correct[s] == correct[bestState] && overrides[s] < overrides[bestState])
                || (correct[s] == correct[bestState] && overrides[s] == overrides[bestState] && Load(s) < Load(bestState)))
            {
                bestState = s;
            }
        }
        int baseCorrect = groups.Sum(g => g[0].Correct);
        if (bestState < 0 || correct[bestState] <= baseCorrect) return result;

        for (int g = groups.Length - 1, state = (int)bestState; g >= 0; g--)
        {
            var opt = groups[g][choice[g][state]];
            if (opt.IsOverride) result[eligible[g]] = opt.Accept;
            int f = state / width - opt.FalseAccept, w = state % width - (capWrong ? opt.Wrong : 0);
            state = f * width + w;
        }
        foreach (var (task, value) in result.OrderBy(r => r.Key, StringComparer.Ordinal))
        {
            notes.Add(string.Create(CultureInfo.InvariantCulture,
                $"Task '{task}': accept override {DecisionRule.Format(value)} (global {DecisionRule.Format(global.Accept)}), backed by {expecting[task]} in-scope probes."));
        }
        return result;

        long Load(long s) => s / width + s % width;
    }

    /// <summary>
    /// The threshold choices for one task: index 0 is the global setting; then every other split of the task's
    /// nearest probes reachable within the allowed shift that keeps the budgets on those probes.
    /// </summary>
    private OverrideOption[] OptionsFor(List<LiveProbe> nearestDescending, Setting global, TuningBudgets budgets)
    {
        var scores = nearestDescending.Select(l => l.Score).ToArray();
        var ends = GroupEnds(scores);
        int oosNear = nearestDescending.Count(l => l.Kind == LiveKind.OutOfScope);
        int inNear = nearestDescending.Count - oosNear;
        float lowest = global.Accept - Options.MaxOverrideShift, highest = global.Accept + Options.MaxOverrideShift;
        // Per-task checks read point rates, except that with UseConfidenceBound an override that accepts more than the
        // global threshold must show its false-accept rate by the bound on the out-of-scope probes nearest the task:
        // where none are near, lowering looks free on the suite, and that is where held-out false accepts come from.
        var local = budgets.UseConfidenceBound ? budgets with { UseConfidenceBound = false } : budgets;

        var options = new List<OverrideOption>();
        int passingAtGlobal = nearestDescending.Count(l => l.Score >= global.Accept);
        var (c0, w0, f0) = Count(nearestDescending, passingAtGlobal, global.Margin);
        options.Add(new OverrideOption(global.Accept, false, c0, w0, f0));
        for (int k = 0; k <= ends.Length; k++)
        {
            int passing = k == 0 ? 0 : ends[k - 1];
            if (passing == passingAtGlobal) continue;
            // Thresholds in (lo, hi] give this split (open-ended at both ends), cut to the allowed shift.
            float hi = k == 0 ? float.PositiveInfinity : scores[ends[k - 1] - 1];
            float lo = k == ends.Length ? float.NegativeInfinity : scores[ends[k] - 1];
            float cutLo = Math.Max(lo, MathF.BitDecrement(lowest)), cutHi = Math.Min(hi, highest);
            if (!(cutLo < cutHi)) continue;
            var (c, w, f) = Count(nearestDescending, passing, global.Margin);
            bool lowers = passing > passingAtGlobal;
            // (0 of 0 meets any budget, but shows nothing: with the bound, lowering needs out-of-scope probes near the task.)
            if (lowers && budgets.UseConfidenceBound && oosNear == 0) continue;
            var faCheck = lowers ? budgets : local;
            if (!faCheck.AllowsFalseAccepts(f, oosNear) || !local.AllowsWrongTask(w, inNear)) continue;
            options.Add(new OverrideOption(Between(cutLo, cutHi), true, c, w, f));
        }
        return options.ToArray();
    }

    /// <summary>Counts correct, wrong-task and false accepts among the first <paramref name="passing"/> probes.</summary>
    private static (int Correct, int Wrong, int FalseAccept) Count(List<LiveProbe> descending, int passing, float margin)
    {
        int c = 0, w = 0, f = 0;
        for (int i = 0; i < passing; i++)
        {
            var l = descending[i];
            if (!(l.Gap >= margin)) continue;
            switch (l.Kind)
            {
                case LiveKind.Correct: c++; break;
                case LiveKind.Wrong: w++; break;
                default: f++; break;
            }
        }
        return (c, w, f);
    }

    /// <summary>The largest count in 0..total that <paramref name="allows"/> accepts (−1 when none).</summary>
    private static int MaxAllowed(Func<int, bool> allows, int total)
    {
        int c = total;
        while (c >= 0 && !allows(c)) c--;
        return c;
    }
}
