using System.Globalization;
using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>
/// Other ways to combine the learned head's outputs into the accept/margin decision, on CLINC150 (Larson et al., 2019,
/// "An Evaluation Dataset for Intent Classification and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0) with the
/// halves of docs/clinc150-strategies.md: the head ranks tasks by s = p^α · max(0, c)^(1 − α) as in production; the
/// accept threshold acts on X (s, the probability p or the centroid cosine c of the top task) and the margin on Y
/// (s₁ − s₂, p₁ − p₂, log p₁ − log p₂ ("lr"), c₁ − c₂, or p₁ minus the runner-up probability in p order ("pm")), with
/// p recomputed at temperature T. Each (X, Y) is tuned on half A (a plain two-threshold sweep, no per-task overrides;
/// false accepts ≤ 10 %, wrong task ≤ 5 %) and applied unchanged to half B. Guards are taken from the production
/// resolution; the embeddings here are of the raw text (no typo correction), so figures differ slightly from the
/// joint search. Prints A and B in-scope accuracy / wrong task / false accept per line; k from <c>TASKPHRASE_CLINC_K</c>.
/// </summary>
[Collection(ModelCollection.Name)]
public class ClincHeadScoreCombinationMeasurement(ModelFixture fixture, ITestOutputHelper output)
{
    sealed record Row(bool InScope, int Expect, bool Guard, float[] P, float[] C);

    [MeasurementFact]
    [Trait("tier", "measure")]
    public void Measure_HeadScoreCombinations_TunedOnHalfA_PrintsHalfB()
    {
        int k = int.Parse(Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_K") ?? "10", CultureInfo.InvariantCulture);
        var gen = ClincEmbeddings.Generator(fixture);
        var (halfA, halfB) = ClincJointSearchMeasurement.Halves();
        var registry = ClincRegistry.Build(k);
        var ids = registry.Tasks.Select(t => t.Id).ToList();
        foreach (double l2 in new[] { 0.01, 0.001 })
        {
            var cand = new ScoringCandidate("head", new ScoringParameters { L2 = l2, Temperature = 1, ProbabilityWeight = 0.25 });
            var resolver = TaskResolver.Create(cand.Apply(registry), gen);
            var head = resolver.Head!;
            var p1 = head.WithProbabilityWeight(1);
            var c0 = head.WithProbabilityWeight(0);
            List<Row> Rows(List<ProbeCase> half)
            {
                var texts = half.Select(p => p.Utterance).ToList();
                var res = resolver.ResolveMany(texts);
                var emb = gen.GenerateAsync(texts).GetAwaiter().GetResult();
                var rows = new List<Row>();
                for (int i = 0; i < half.Count; i++)
                {
                    var P = new float[ids.Count]; var C = new float[ids.Count];
                    p1.ScoreTasks(emb[i].Vector.Span, P, out _);
                    c0.ScoreTasks(emb[i].Vector.Span, C, out _);
                    rows.Add(new Row(half[i].IsInScope, half[i].IsInScope ? ids.IndexOf(half[i].Expect) : -1, res[i].Guard != RejectionReason.None, P, C));
                }
                return rows;
            }
            var A = Rows(halfA); var B = Rows(halfB);
            foreach (double alpha in new[] { 0.25, 0.5 })
            foreach (double T in new[] { 1.0, 2.0, 0.5 })
            {
                foreach (var (xName, yName) in new[] { ("s", "s"), ("s", "p"), ("s", "lr"), ("c", "p"), ("c", "lr"), ("s", "c"), ("p", "p"), ("s","pm") })
                {
                    var fa = Feat(A, alpha, T, xName, yName); var fb = Feat(B, alpha, T, xName, yName);
                    var (th, m, ra) = Tune(fa);
                    var rb = Eval(fb, th, m);
                    output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"k={k} L2 {l2} α {alpha} T {T} X={xName} Y={yName}: A {ra} | B {rb}"));
                }
            }
        }
    }

    // Per probe: predicted correct?, in scope?, guard, X, Y.
    static List<(bool In, bool Correct, bool Guard, double X, double Y)> Feat(List<Row> rows, double alpha, double T, string x, string y)
    {
        var list = new List<(bool, bool, bool, double, double)>();
        foreach (var r in rows)
        {
            int n = r.P.Length;
            var p = new double[n]; double sum = 0;
            for (int t = 0; t < n; t++) { p[t] = Math.Exp(Math.Log(Math.Max(r.P[t], 1e-30)) / T); sum += p[t]; }
            for (int t = 0; t < n; t++) p[t] /= sum;
            var s = new double[n];
            for (int t = 0; t < n; t++) s[t] = Math.Pow(p[t], alpha) * Math.Pow(Math.Max(0, r.C[t]), 1 - alpha);
            var order = Enumerable.Range(0, n).OrderByDescending(t => s[t]).ToArray();
            int b = order[0], b2 = order[1];
            var pOrder = p.OrderDescending().ToArray();
            double X = x switch { "s" => s[b], "c" => r.C[b], "p" => p[b], _ => throw new() };
            double Y = y switch
            {
                "s" => s[b] - s[b2],
                "p" => p[b] - p[b2],
                "lr" => Math.Log(p[b]) - Math.Log(p[b2]),
                "c" => r.C[b] - r.C[b2],
                "pm" => p[b] - pOrder.First(v => v != p[b] ),
                _ => throw new(),
            };
            list.Add((r.InScope, r.InScope && b == r.Expect, r.Guard, X, Y));
        }
        return list;
    }

    static (double Th, double M, string Rates) Tune(List<(bool In, bool Correct, bool Guard, double X, double Y)> f)
    {
        int ins = f.Count(r => r.In), oos = f.Count - ins;
        var ys = f.Where(r => r.In && !r.Guard).Select(r => r.Y).Order().ToArray();
        var margins = new SortedSet<double> { double.NegativeInfinity };
        for (int q = 1; q <= 60; q++) margins.Add(ys[(int)(q * 0.01 * (ys.Length - 1))]);
        double bestTh = double.PositiveInfinity, bestM = 0; int best = -1;
        foreach (double m in margins)
        {
            var el = f.Where(r => !r.Guard && r.Y >= m).OrderByDescending(r => r.X).ToArray();
            int c = 0, w = 0, a = 0;
            for (int i = 0; i < el.Length; i++)
            {
                var r = el[i];
                if (!r.In) a++; else if (r.Correct) c++; else w++;
                if (a > 0.10 * oos || w > 0.05 * ins) break;
                if (i + 1 < el.Length && el[i + 1].X == r.X) continue;
                if (c > best) { best = c; bestTh = i + 1 < el.Length ? 0.5 * (r.X + el[i + 1].X) : r.X; bestM = m; }
            }
        }
        return (bestTh, bestM, Eval(f, bestTh, bestM));
    }

    static string Eval(List<(bool In, bool Correct, bool Guard, double X, double Y)> f, double th, double m)
    {
        int ins = f.Count(r => r.In), oos = f.Count - ins, c = 0, w = 0, a = 0;
        foreach (var r in f)
        {
            if (r.Guard || r.X < th || r.Y < m) continue;
            if (!r.In) a++; else if (r.Correct) c++; else w++;
        }
        return string.Create(CultureInfo.InvariantCulture, $"{100.0 * c / ins:0.0} % / {100.0 * w / ins:0.0} % / {100.0 * a / oos:0.0} %");
    }
}
