namespace TaskPhrase.Evaluation;

public sealed partial class ThresholdTuner
{
    /// <summary>One evaluated (accept, margin) setting.</summary>
    private readonly record struct Setting(float Accept, float Margin, int Correct, int Wrong, int FalseAccept, bool Feasible, double Violation)
    {
        public bool IsSet => !float.IsNaN(Accept);

        public static Setting None => new(float.NaN, float.NaN, 0, 0, 0, false, double.PositiveInfinity);
    }

    private TuningResult SearchBudgets(IReadOnlyList<ScoredProbe> probes, Prepared prepared, TuningBudgets budgets)
    {
        var margins = MarginCandidates(prepared.Live);
        var caps = Options.TradeOffWrongTaskCaps;
        var best = Setting.None;
        var bestPerCap = Enumerable.Repeat(Setting.None, caps.Count).ToArray();

        foreach (float margin in margins)
        {
            Sweep(prepared, margin, (k, correct, wrong, fa) =>
            {
                float accept = prepared.AcceptCandidates[k];
                bool faOk = budgets.AllowsFalseAccepts(fa, prepared.OutOfScope);
                bool feasible = faOk && budgets.AllowsWrongTask(wrong, prepared.InScope);
                var s = new Setting(accept, margin, correct, wrong, fa, feasible,
                    feasible ? 0 : budgets.Violation(fa, prepared.OutOfScope, wrong, prepared.InScope));
                if (IsBetter(s, best)) best = s;
                if (!faOk) return;
                for (int c = 0; c < caps.Count; c++)
                {
                    if ((double)wrong / prepared.InScope <= caps[c])
                    {
                        var sc = s with { Feasible = true, Violation = 0 };
                        if (IsBetter(sc, bestPerCap[c])) bestPerCap[c] = sc;
                    }
                }
            });
        }

        var notes = new List<string>();
        var globalRule = new DecisionRule(best.Accept, best.Margin);
        var rule = globalRule;
        if (Options.AllowOverrides && best.Feasible)
        {
            var overrides = ChooseOverrides(probes, prepared, budgets, best, notes);
            if (overrides.Count > 0)
            {
                var candidate = new DecisionRule(best.Accept, best.Margin, overrides);
                var m = TuningMetrics.Evaluate(probes, candidate);
                if (budgets.AllowsFalseAccepts(m.FalseAcceptRate.Count, m.OutOfScope) && budgets.AllowsWrongTask(m.WrongTaskRate.Count, m.InScope)
                    && m.InScopeAccuracy.Count > best.Correct)
                {
                    rule = candidate;
                }
                else
                {
                    notes.Add("Per-task overrides were dropped: re-checked with the decision rule they did not improve accuracy within the budgets.");
                }
            }
        }
        else if (!best.Feasible)
        {
            notes.Add("No setting meets the budgets; the result is the setting with the smallest budget violation. " +
                "Check the suite for out-of-scope probes that are approved phrases (exact matches are always accepted).");
        }

        var metrics = TuningMetrics.Evaluate(probes, rule);
        bool ok = budgets.AllowsFalseAccepts(metrics.FalseAcceptRate.Count, metrics.OutOfScope)
            && budgets.AllowsWrongTask(metrics.WrongTaskRate.Count, metrics.InScope);
        var tradeOff = new TradeOffPoint[caps.Count];
        for (int c = 0; c < caps.Count; c++)
        {
            var p = bestPerCap[c];
            tradeOff[c] = p.IsSet
                ? new TradeOffPoint(caps[c], true, (double)p.Correct / prepared.InScope, (double)p.Wrong / prepared.InScope,
                    (double)p.FalseAccept / prepared.OutOfScope, p.Accept, p.Margin)
                : new TradeOffPoint(caps[c], false, 0, 0, 0, float.NaN, float.NaN);
        }
        return new TuningResult
        {
            Mode = TuningMode.Budget,
            Rule = rule,
            Metrics = metrics,
            Feasible = ok,
            Violation = ok ? 0 : budgets.Violation(metrics.FalseAcceptRate.Count, metrics.OutOfScope, metrics.WrongTaskRate.Count, metrics.InScope),
            Budgets = budgets,
            TradeOff = Array.AsReadOnly(tradeOff),
            Notes = notes.AsReadOnly(),
            ProbeCount = probes.Count,
        };
    }

    /// <summary>
    /// Feasible beats infeasible; among infeasible settings the smaller violation wins; then more correct
    /// acceptances; then the stricter setting (higher accept, then larger margin).
    /// </summary>
    private static bool IsBetter(Setting a, Setting b)
    {
        if (!b.IsSet) return true;
        if (a.Feasible != b.Feasible) return a.Feasible;
        if (!a.Feasible && a.Violation != b.Violation) return a.Violation < b.Violation;
        if (a.Correct != b.Correct) return a.Correct > b.Correct;
        if (a.Accept != b.Accept) return a.Accept > b.Accept;
        return a.Margin > b.Margin;
    }

    /// <summary>
    /// Sweeps the accept candidates for one margin from strict to lenient, reporting the totals (constant
    /// exact-match contributions included) for every prefix of score groups. O(n).
    /// </summary>
    private static void Sweep(Prepared prepared, float margin, Action<int, int, int, int> visit)
    {
        int correct = prepared.ConstCorrect, wrong = prepared.ConstWrong, fa = prepared.ConstFalseAccept;
        visit(0, correct, wrong, fa);
        int start = 0;
        for (int k = 0; k < prepared.GroupEnd.Length; k++)
        {
            int end = prepared.GroupEnd[k];
            for (int i = start; i < end; i++)
            {
                ref readonly var p = ref prepared.Live[i];
                if (!(p.Gap >= margin)) continue; // ambiguous: counts as a false reject, or as a correct refusal
                switch (p.Kind)
                {
                    case LiveKind.Correct: correct++; break;
                    case LiveKind.Wrong: wrong++; break;
                    default: fa++; break;
                }
            }
            start = end;
            visit(k + 1, correct, wrong, fa);
        }
    }

    /// <summary>
    /// The margins to try: the grid, plus (when enabled) one value between each pair of consecutive distinct
    /// observed gaps below the largest grid margin, thinned evenly to <see cref="TuningOptions.MaxGapMargins"/>.
    /// </summary>
    private float[] MarginCandidates(LiveProbe[] live)
    {
        var set = new SortedSet<float>(Options.MarginGrid);
        float maxMargin = Options.MarginGrid[^1];
        if (Options.IncludeGapMargins)
        {
            var gaps = live.Select(l => l.Gap).Where(g => float.IsFinite(g)).Distinct().Order().ToArray();
            var between = new List<float>();
            for (int j = 0; j + 1 < gaps.Length && gaps[j] < maxMargin; j++)
            {
                float hi = Math.Min(gaps[j + 1], maxMargin);
                if (hi > gaps[j]) between.Add(Between(gaps[j], hi));
            }
            if (between.Count > Options.MaxGapMargins)
            {
                var thinned = new List<float>(Options.MaxGapMargins);
                for (int i = 0; i < Options.MaxGapMargins; i++)
                {
                    thinned.Add(between[(int)((long)i * between.Count / Options.MaxGapMargins)]);
                }
                between = thinned;
            }
            set.UnionWith(between);
        }
        return set.ToArray();
    }
}
