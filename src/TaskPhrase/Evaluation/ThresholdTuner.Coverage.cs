using System.Globalization;

namespace TaskPhrase.Evaluation;

public sealed partial class ThresholdTuner
{
    /// <summary>
    /// The rank k = ⌈(n+1)R⌉ of the split-conformal quantile (Angelopoulos &amp; Bates 2021). A relative slack of
    /// 1e-12 keeps products such as 99 × 0.9 = 89.10000000000001 from rounding up past the exact value.
    /// </summary>
    internal static int ConformalRank(int n, double coverage)
    {
        double product = (n + 1) * coverage;
        return (int)Math.Ceiling(product - Math.Abs(product) * 1e-12);
    }

    private TuningResult SearchCoverage(IReadOnlyList<ScoredProbe> probes, double coverage, float margin)
    {
        var expectedScores = probes.Where(p => p.Probe.IsInScope).Select(p => p.ScoreOfExpected!.Value).ToArray();
        int n = expectedScores.Length;
        if (n == 0)
        {
            throw new ArgumentException("The tuning suite has no in-scope probes (rows whose expect is a task id); coverage tuning needs them.", nameof(probes));
        }
        foreach (float s in expectedScores)
        {
            if (!float.IsFinite(s)) throw new ArgumentException($"An in-scope probe has a non-finite expected-task score {s}.", nameof(probes));
        }
        Array.Sort(expectedScores);
        Array.Reverse(expectedScores); // descending: the k-th largest score is the k-th smallest non-conformity
        int k = ConformalRank(n, coverage);
        var notes = new List<string>();
        bool feasible = k <= n;
        float accept;
        double? quantile = null;
        if (feasible)
        {
            float kth = expectedScores[k - 1];
            quantile = 1.0 - kth;
            // Any threshold in (next lower distinct score, kth] accepts the same probes; prefer a short value.
            int next = k;
            while (next < n && expectedScores[next] == kth) next++;
            float lower = next < n ? expectedScores[next] : Math.Min(MathF.BitDecrement(kth), kth - EndStep);
            accept = Between(lower, kth);
            notes.Add(string.Create(CultureInfo.InvariantCulture,
                $"Split conformal (Angelopoulos & Bates 2021): n = {n} in-scope probes, k = ceil((n+1)R) = {k}, q-hat = {quantile:0.######}, accept = {DecisionRule.Format(accept)}."));
        }
        else
        {
            accept = Math.Min(-1f, expectedScores[^1]);
            int needed = (int)Math.Ceiling(coverage / (1 - coverage) - 1e-9);
            notes.Add(string.Create(CultureInfo.InvariantCulture,
                $"Coverage {coverage} needs at least {needed} in-scope probes for the finite-sample quantile to exist; the suite has {n}. The threshold accepts every score; add in-scope probes or lower the target."));
        }
        var rule = new DecisionRule(accept, margin);
        int covered = expectedScores.Count(s => s >= accept);
        return new TuningResult
        {
            Mode = TuningMode.Coverage,
            Rule = rule,
            Metrics = TuningMetrics.Evaluate(probes, rule),
            Feasible = feasible,
            CoverageTarget = coverage,
            ConformalQuantile = quantile,
            AchievedCoverage = (double)covered / n,
            Notes = notes.AsReadOnly(),
            ProbeCount = probes.Count,
        };
    }
}
