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
        // Budgets as largest allowed counts, so the inner loop compares integers (same answers as the rate checks).
        int faAllowed = MaxAllowed(c => budgets.AllowsFalseAccepts(c, prepared.OutOfScope), prepared.OutOfScope);
        int wrongAllowed = MaxAllowed(c => budgets.AllowsWrongTask(c, prepared.InScope), prepared.InScope);
        // Trade-off caps are read the way the budgets are (point rates, or upper 95 % bounds).
        var capAllowed = caps.Select(cap => MaxAllowed(c => new TuningBudgets(1, cap) { UseConfidenceBound = budgets.UseConfidenceBound }.AllowsWrongTask(c, prepared.InScope), prepared.InScope)).ToArray();
        var live = prepared.Live;
        var groupEnd = prepared.GroupEnd;
        var accepts = prepared.AcceptCandidates;

        foreach (float margin in margins)
        {
            // Sweep the accept candidates from strict to lenient: candidate k lets the first k score groups pass.
            int correct = prepared.ConstCorrect, wrong = prepared.ConstWrong, fa = prepared.ConstFalseAccept;
            int start = 0;
            for (int k = 0; k <= groupEnd.Length; k++)
            {
                if (k > 0)
                {
                    int end = groupEnd[k - 1];
                    for (int i = start; i < end; i++)
                    {
                        ref readonly var p = ref live[i];
                        if (!(p.Gap >= margin)) continue; // ambiguous: a false reject, or a correct refusal
                        switch (p.Kind)
                        {
                            case LiveKind.Correct: correct++; break;
                            case LiveKind.Wrong: wrong++; break;
                            default: fa++; break;
                        }
                    }
                    start = end;
                }
                bool faOk = fa <= faAllowed;
                bool feasible = faOk && wrong <= wrongAllowed;
                // Over the false-accept budget: cannot beat a feasible setting and is no point of the curve.
                if (!faOk && best.Feasible) continue;
                var s = new Setting(accepts[k], margin, correct, wrong, fa, feasible,
                    feasible ? 0 : budgets.Violation(fa, prepared.OutOfScope, wrong, prepared.InScope));
                if (IsBetter(s, best)) best = s;
                if (!faOk) continue;
                for (int c = 0; c < capAllowed.Length; c++)
                {
                    if (wrong <= capAllowed[c] && correct >= bestPerCap[c].Correct && IsBetter(s with { Feasible = true, Violation = 0 }, bestPerCap[c]))
                    {
                        bestPerCap[c] = s with { Feasible = true, Violation = 0 };
                    }
                }
            }
        }

        var notes = new List<string>();
        if (budgets.UseConfidenceBound) AddBoundNotes(notes, budgets, prepared, faAllowed, wrongAllowed);
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
            notes.Add((budgets.UseConfidenceBound
                    ? "No setting meets the budgets read by their upper 95 % bounds; the result is the setting with the smallest violation of them. " +
                      "A larger suite narrows the bounds (see the note above). Also check"
                    : "No setting meets the budgets; the result is the setting with the smallest budget violation. Check") +
                " the suite for out-of-scope probes that are approved phrases (exact matches are always accepted).");
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
                : new TradeOffPoint(caps[c], false, 0, 0, 0, null, null);
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

    /// <summary>What reading the budgets by their upper 95 % bounds allows on this suite, and what it would take when it allows nothing.</summary>
    private static void AddBoundNotes(List<string> notes, TuningBudgets budgets, Prepared prepared, int faAllowed, int wrongAllowed)
    {
        var inv = System.Globalization.CultureInfo.InvariantCulture;
        void Kind(string what, string probes, double budget, int allowed, int total)
        {
            if (allowed >= 0)
            {
                notes.Add(string.Create(inv,
                    $"Conservative budgets: at most {allowed} {(allowed == 1 ? what.TrimEnd('s') : what)} of {total} {probes} probes keep the upper 95 % Wilson bound within {budget:0.######}."));
                return;
            }
            double upper = Statistics.WilsonInterval(0, total).High;
            string need = budgets.ProbesNeededFor(budget) is { } n
                ? string.Create(inv, $"the suite needs at least {n} {probes} probes for this budget")
                : budget <= 0 ? "a budget of 0 cannot be shown by any suite" : "no suite of practical size can show a budget this small";
            notes.Add(string.Create(inv,
                $"Conservative budgets: with {total} {probes} probes even 0 {what} has an upper 95 % Wilson bound of {upper:0.####}, above the budget {budget:0.######}; {need}, or tune on point rates."));
        }
        Kind("false accepts", "out-of-scope", budgets.MaxFalseAccept, faAllowed, prepared.OutOfScope);
        if (budgets.MaxWrongTask is { } cap) Kind("wrong-task accepts", "in-scope", cap, wrongAllowed, prepared.InScope);
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
            // Gap j and the next one bound the margins that leave gaps up to j ambiguous.
            int usable = 0;
            while (usable + 1 < gaps.Length && gaps[usable] < maxMargin) usable++;
            int take = Math.Min(usable, Options.MaxGapMargins);
            for (int t = 0; t < take; t++)
            {
                int j = (int)((long)t * usable / take);
                set.Add(Between(gaps[j], Math.Min(gaps[j + 1], maxMargin)));
            }
        }
        return set.ToArray();
    }
}
