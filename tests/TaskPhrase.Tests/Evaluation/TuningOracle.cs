using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>
/// Brute-force reference for the budget search: every accept threshold that splits the suite differently
/// (each distinct best score, and one above them all) crossed with every margin that does (the grid and each
/// distinct observed gap up to the largest grid margin), each judged probe by probe with
/// <see cref="DecisionRule.Apply"/>. O(n³); only for small suites.
/// </summary>
internal static class TuningOracle
{
    public sealed record Choice(DecisionRule Rule, TuningMetrics Metrics, bool Feasible, double Violation);

    // upper: when given, each rate is read as this upper confidence bound of (count, total) instead of count / total
    // (for budgets with TuningBudgets.UseConfidenceBound).
    public static Choice Best(IReadOnlyList<ScoredProbe> probes, TuningBudgets budgets, IReadOnlyList<float> grid, bool includeGaps = true,
        Func<int, int, double>? upper = null)
    {
        var accepts = probes.Select(p => p.BestScore).Append(2f).Distinct().ToList();
        float maxMargin = grid.Max();
        var gaps = includeGaps
            ? probes.Where(p => p.RunnerUpTask is not null).Select(p => p.BestScore - p.RunnerUpScore).Where(g => g > 0 && g <= maxMargin)
            : [];
        var margins = grid.Concat(gaps).Distinct().ToList();
        Choice? best = null;
        foreach (float a in accepts)
        {
            foreach (float m in margins)
            {
                var rule = new DecisionRule(a, m);
                var metrics = TuningMetrics.Evaluate(probes, rule);
                int fa = metrics.FalseAcceptRate.Count, wt = metrics.WrongTaskRate.Count;
                // Budgets checked here from the definitions, not through TuningBudgets' helpers.
                double faRate = Read(fa, metrics.OutOfScope), wtRate = Read(wt, metrics.InScope);
                bool feasible = faRate <= budgets.MaxFalseAccept && (budgets.MaxWrongTask is not { } cap || wtRate <= cap);
                double violation = Math.Max(0, faRate - budgets.MaxFalseAccept) + (budgets.MaxWrongTask is { } c ? Math.Max(0, wtRate - c) : 0);
                var choice = new Choice(rule, metrics, feasible, feasible ? 0 : violation);
                if (best is null || Better(choice, best)) best = choice;
            }
        }
        return best!;

        double Read(int count, int total) => upper is null ? (double)count / total : upper(count, total);
    }

    private static bool Better(Choice a, Choice b)
    {
        if (a.Feasible != b.Feasible) return a.Feasible;
        if (!a.Feasible && a.Violation != b.Violation) return a.Violation < b.Violation;
        int ca = a.Metrics.InScopeAccuracy.Count, cb = b.Metrics.InScopeAccuracy.Count;
        if (ca != cb) return ca > cb;
        if (a.Rule.Accept != b.Rule.Accept) return a.Rule.Accept > b.Rule.Accept;
        return a.Rule.Margin > b.Rule.Margin;
    }
}
