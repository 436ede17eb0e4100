using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>One probe after resolving with permissive thresholds: what a given accept/margin pair would decide.</summary>
/// <param name="InScope">The probe expects a task.</param>
/// <param name="TopCorrect">The top candidate is the expected task.</param>
/// <param name="Score">The top candidate's score.</param>
/// <param name="Margin">Top minus runner-up score (+∞ when there is none, e.g. an exact match).</param>
/// <param name="Refused">Refused whatever the thresholds (unintelligible, negated, hazard, look-alike).</param>
public readonly record struct ScoredProbe(bool InScope, bool TopCorrect, float Score, float Margin, bool Refused)
{
    /// <summary>Converts a resolution made with accept −∞ and margin 0.</summary>
    public static ScoredProbe From(string expect, TaskPhrase.Resolution.Resolution r) => new(
        expect != TaskPhrase.Evaluation.ProbeCase.Reject,
        r.Candidates.Count > 0 && r.Candidates[0].TaskId == expect,
        r.Score ?? float.NegativeInfinity,
        r.Margin ?? float.PositiveInfinity,
        r.Outcome != ResolutionOutcome.Accepted);

    public bool Accepted(float accept, float margin) => !Refused && Score >= accept && Margin >= margin;
}

/// <summary>Counts at one operating point (accept, margin), with the rates of product.md.</summary>
public sealed record OperatingPoint(float Accept, float Margin, int Correct, int Wrong, int FalseAccepts, int InScope, int OutOfScope)
{
    public double Accuracy => Correct / (double)InScope;
    public double WrongTaskRate => Wrong / (double)InScope;
    public double FalseAcceptRate => OutOfScope == 0 ? 0 : FalseAccepts / (double)OutOfScope;

    public static OperatingPoint Evaluate(IReadOnlyList<ScoredProbe> rows, float accept, float margin)
    {
        int correct = 0, wrong = 0, fa = 0, ins = 0, oos = 0;
        foreach (var r in rows)
        {
            bool acc = r.Accepted(accept, margin);
            if (r.InScope) { ins++; if (acc && r.TopCorrect) correct++; else if (acc) wrong++; }
            else { oos++; if (acc) fa++; }
        }
        return new OperatingPoint(accept, margin, correct, wrong, fa, ins, oos);
    }
}

/// <summary>
/// A small threshold search (not the production tuner): for each margin from a grid, sweeps the accept threshold
/// over the midpoints between sorted scores and keeps the point with the most correct acceptances whose false-accept
/// and wrong-task rates stay within the budgets.
/// </summary>
public static class HalfSplitTuner
{
    public static OperatingPoint Tune(IReadOnlyList<ScoredProbe> rows, double maxFalseAccept, double maxWrongTask)
    {
        int ins = rows.Count(r => r.InScope), oos = rows.Count - ins;
        var inMargins = rows.Where(r => r.InScope && !r.Refused && float.IsFinite(r.Margin)).Select(r => r.Margin).Order().ToArray();
        var margins = new SortedSet<float> { 0f };
        for (int q = 1; q <= 25; q++) margins.Add(inMargins[(int)(q * 0.02 * (inMargins.Length - 1))]);
        var best = new OperatingPoint(float.PositiveInfinity, 0, 0, 0, 0, ins, oos);
        foreach (float m in margins)
        {
            var eligible = rows.Where(r => !r.Refused && r.Margin >= m).OrderByDescending(r => r.Score).ToArray();
            int correct = 0, wrong = 0, fa = 0;
            for (int i = 0; i < eligible.Length;)
            {
                float s = eligible[i].Score;
                for (; i < eligible.Length && eligible[i].Score == s; i++)
                {
                    var r = eligible[i];
                    if (!r.InScope) fa++;
                    else if (r.TopCorrect) correct++;
                    else wrong++;
                }
                if (fa > maxFalseAccept * oos || wrong > maxWrongTask * ins) break;
                float next = i < eligible.Length ? eligible[i].Score : float.NegativeInfinity;
                float accept = float.IsFinite(next) ? s - 0.5f * (s - next) : s;
                if (accept > s || accept <= next) accept = s; // midpoint not representable between neighbours
                if (correct > best.Correct || correct == best.Correct && wrong + fa < best.Wrong + best.FalseAccepts)
                    best = new OperatingPoint(accept, m, correct, wrong, fa, ins, oos);
            }
        }
        return best;
    }
}
