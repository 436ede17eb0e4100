using System.Globalization;
using TaskPhrase.Evaluation;
using TaskPhrase.Onnx;
using TaskPhrase.Resolution;
using TaskPhrase.Tests.TestDoubles;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>
/// Where the head's operating point lands on held-out queries, CLINC150 (Larson et al., 2019, "An Evaluation Dataset for
/// Intent Classification and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0), protocol of docs/clinc150-strategies.md
/// (registries of the first k training queries per intent, head settings searched on validation half A under ≤ 10 %
/// false accepts and ≤ 5 % wrong task). <see cref="Measure_OperatingPoints"/> prints, for the chosen setting, half A
/// and half B at the tuned rule, at re-tuned stricter false-accept budgets and along a sweep of the global accept
/// threshold (what half B's own frontier allows), then the out-of-scope queries that score highest on each half.
/// <see cref="Measure_DensitySignals"/> compares the head's score with nearest-neighbour cosines to the predicted task's
/// approved phrases (mean of the top 1, 5, 10) as out-of-scope signals: AUROC on each half, and each as a second
/// threshold next to the head's, tuned on A by a grid. k from <c>TASKPHRASE_CLINC_K</c> (default 100), model from
/// <c>TASKPHRASE_CLINC_MODEL</c> (default the bundled one).
/// </summary>
[Collection(ModelCollection.Name)]
public class ClincOperatingPointMeasurement(ModelFixture fixture, ITestOutputHelper output)
{
    /// <summary>The model named by <c>TASKPHRASE_CLINC_MODEL</c>, or null for the fixture's bundled one.</summary>
    private static OnnxEmbedder? OtherModel()
        => Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_MODEL") is { Length: > 0 } dir ? OnnxEmbedder.Create(dir) : null;

    private Microsoft.Extensions.AI.IEmbeddingGenerator<string, Microsoft.Extensions.AI.Embedding<float>> Generator(OnnxEmbedder? other)
        => other is null ? fixture.Embedder : new CachingEmbeddingGenerator(other);

    [MeasurementFact]
    [Trait("tier", "measure")]
    public void Measure_OperatingPoints()
    {
        var (halfA, halfB) = ClincJointSearchMeasurement.Halves();
        using var other = OtherModel();
        var gen = Generator(other);
        var registry = ClincRegistry.Build(int.Parse(Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_K") ?? "100", CultureInfo.InvariantCulture));
        var budgets = new TuningBudgets(0.10, 0.05);
        var search = ScoringSearch.Run(registry, gen, halfA, budgets, ScoringCandidate.DefaultGrid(["head"]));
        output.WriteLine($"chosen {search.Chosen.Label}: accept {search.Result.Rule.Accept} margin {search.Result.Rule.Margin} overrides {search.Result.Rule.AcceptOverrides.Count}");
        var resolver = TaskResolver.Create(search.Chosen.Apply(registry), gen);
        List<TaskPhrase.Evaluation.ScoredProbe> Score(List<ProbeCase> half)
        {
            var res = resolver.ResolveMany(half.Select(p => p.Utterance).ToList());
            return half.Select((p, i) => TaskPhrase.Evaluation.ScoredProbe.From(p, res[i])).ToList();
        }
        var a = Score(halfA);
        var b = Score(halfB);
        string M(TuningMetrics m) => string.Create(CultureInfo.InvariantCulture,
            $"{100 * m.InScopeAccuracy.Value:0.0} / {100 * m.WrongTaskRate.Value:0.0} / {100 * m.FalseAcceptRate.Value:0.0}");
        void Row(string label, DecisionRule rule) => output.WriteLine($"{label,-40} A {M(TuningMetrics.Evaluate(a, rule))}   B {M(TuningMetrics.Evaluate(b, rule))}");
        Row("chosen (default tuner)", search.Result.Rule);
        var r = search.Result.Rule;
        Row("chosen without overrides", new DecisionRule(r.Accept, r.Margin));
        Row("chosen, raising overrides only", new DecisionRule(r.Accept, r.Margin, r.AcceptOverrides.Where(o => o.Value > r.Accept).ToDictionary()));
        foreach (double fa in new[] { 0.10, 0.08, 0.06, 0.04 })
        foreach (bool ov in new[] { true, false })
        {
            var t = new ThresholdTuner(new TuningOptions { AllowOverrides = ov }).TuneForBudgets(a, new TuningBudgets(fa, 0.05));
            Row(string.Create(CultureInfo.InvariantCulture, $"tuned FA≤{fa:0.00} overrides {ov} ({t.Rule.Accept:0.000}/{t.Rule.Margin:0.000}/{t.Rule.AcceptOverrides.Count})"), t.Rule);
        }
        for (float acc = 0.05f; acc <= 0.60f; acc += 0.025f)
            Row(string.Create(CultureInfo.InvariantCulture, $"accept {acc:0.000} margin {r.Margin:0.000}"), new DecisionRule(acc, r.Margin));
        string Oos(List<TaskPhrase.Evaluation.ScoredProbe> s) => string.Join(" ", s.Where(p => !p.Probe.IsInScope && !p.GuardRejected).Select(p => p.BestScore).OrderDescending().Take(16).Select(x => x.ToString("0.000", CultureInfo.InvariantCulture)));
        output.WriteLine($"A oos top scores: {Oos(a)}");
        output.WriteLine($"B oos top scores: {Oos(b)}");
        foreach (var (name, set) in new[] { ("A", a), ("B", b) })
        foreach (var p in set.Where(p => !p.Probe.IsInScope && !p.GuardRejected && p.BestScore >= 0.40f).OrderByDescending(p => p.BestScore))
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{name} oos {p.BestScore:0.000} gap {p.BestScore - p.RunnerUpScore:0.000} → {p.BestTask}: {p.Probe.Utterance}"));
        output.WriteLine($"A oos guard-rejected {a.Count(p => !p.Probe.IsInScope && p.GuardRejected)}, B {b.Count(p => !p.Probe.IsInScope && p.GuardRejected)}");
    }

    [MeasurementFact]
    [Trait("tier", "measure")]
    public void Measure_DensitySignals()
    {
        var (halfA, halfB) = ClincJointSearchMeasurement.Halves();
        using var other = OtherModel();
        var gen = Generator(other);
        var registry = ClincRegistry.Build(int.Parse(Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_K") ?? "100", CultureInfo.InvariantCulture));
        var search = ScoringSearch.Run(registry, gen, halfA, new TuningBudgets(0.10, 0.05), ScoringCandidate.DefaultGrid(["head"]).Take(1).ToList());
        var resolver = TaskResolver.Create(search.Chosen.Apply(registry), gen);
        var phraseTexts = registry.Tasks.SelectMany(t => t.Phrases).ToList();
        var owner = registry.Tasks.SelectMany(t => t.Phrases.Select(_ => t.Id)).ToArray();
        var pv = gen.GenerateAsync(phraseTexts).GetAwaiter().GetResult().Select(e => e.Vector.ToArray()).ToArray();
        float Dot(float[] x, float[] y) { float s = 0; for (int i = 0; i < x.Length; i++) s += x[i] * y[i]; return s; }
        (List<TaskPhrase.Evaluation.ScoredProbe> S, double[][] F) Score(List<ProbeCase> half)
        {
            var res = resolver.ResolveMany(half.Select(p => p.Utterance).ToList());
            var qv = gen.GenerateAsync(half.Select(p => p.Utterance).ToList()).GetAwaiter().GetResult().Select(e => e.Vector.ToArray()).ToArray();
            var scored = half.Select((p, i) => TaskPhrase.Evaluation.ScoredProbe.From(p, res[i])).ToList();
            var feats = new double[half.Count][];
            for (int q = 0; q < half.Count; q++)
            {
                var task = scored[q].BestTask;
                var mine = new List<float>();
                var all = new List<float>();
                for (int r = 0; r < pv.Length; r++) { float c = Dot(qv[q], pv[r]); all.Add(c); if (owner[r] == task) mine.Add(c); }
                mine.Sort(); mine.Reverse(); all.Sort(); all.Reverse();
                double knn(int n) => mine.Count == 0 ? -1 : mine.Take(n).Average();
                feats[q] = [scored[q].BestScore, knn(1), knn(5), knn(10), all.Take(10).Average()];
            }
            return (scored, feats);
        }
        var (sa, fa) = Score(halfA);
        var (sb, fb) = Score(halfB);
        string[] names = ["head", "knn1", "knn5", "knn10", "any10"];
        double Auroc(List<TaskPhrase.Evaluation.ScoredProbe> s, double[][] f, int j)
        {
            var pos = s.Select((p, i) => (p, i)).Where(x => x.p.Probe.IsInScope && !x.p.GuardRejected).Select(x => f[x.i][j]).ToList();
            var neg = s.Select((p, i) => (p, i)).Where(x => !x.p.Probe.IsInScope && !x.p.GuardRejected).Select(x => f[x.i][j]).ToList();
            double w = 0; foreach (var a in pos) foreach (var b in neg) w += a > b ? 1 : a == b ? 0.5 : 0;
            return w / (pos.Count * (double)neg.Count);
        }
        for (int j = 0; j < names.Length; j++)
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"AUROC {names[j]}: A {Auroc(sa, fa, j):0.0000} B {Auroc(sb, fb, j):0.0000}"));
        float margin = search.Result.Rule.Margin;
        (int c, int w, int f) Count(List<TaskPhrase.Evaluation.ScoredProbe> s, double[][] f, int j, double t1, double t2)
        {
            int c = 0, w = 0, fa2 = 0;
            for (int i = 0; i < s.Count; i++)
            {
                var p = s[i];
                bool acc = p.ExactMatch || (!p.GuardRejected && p.BestTask is not null && p.BestScore >= t1 && (p.BestScore - p.RunnerUpScore) >= margin && f[i][j] >= t2);
                if (!acc) continue;
                if (!p.Probe.IsInScope) fa2++; else if (p.BestTask == p.Probe.Expect) c++; else w++;
            }
            return (c, w, fa2);
        }
        int nInA = sa.Count(p => p.Probe.IsInScope), nOutA = sa.Count - nInA, nInB = sb.Count(p => p.Probe.IsInScope), nOutB = sb.Count - nInB;
        for (int j = 1; j < names.Length; j++)
        {
            var t1s = Enumerable.Range(0, 40).Select(i => 0.05 + 0.02 * i).ToArray();
            var t2s = Enumerable.Range(0, 50).Select(i => 0.2 + 0.015 * i).ToArray();
            var best = (c: -1, t1: 0.0, t2: 0.0);
            foreach (var t1 in t1s) foreach (var t2 in t2s)
            {
                var (c, w, f) = Count(sa, fa, j, t1, t2);
                if (f <= 0.10 * nOutA && w <= 0.05 * nInA && c > best.c) best = (c, t1, t2);
            }
            var (cb, wb, fb2) = Count(sb, fb, j, best.t1, best.t2);
            var (ca, wa, faa) = Count(sa, fa, j, best.t1, best.t2);
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"head ≥ {best.t1:0.00} and {names[j]} ≥ {best.t2:0.000}: A {100.0 * ca / nInA:0.0}/{100.0 * wa / nInA:0.0}/{100.0 * faa / nOutA:0.0}  B {100.0 * cb / nInB:0.0}/{100.0 * wb / nInB:0.0}/{100.0 * fb2 / nOutB:0.0}"));
        }
    }

}
