using System.Diagnostics;
using System.Globalization;
using System.Text;
using TaskPhrase.Resolution;
using TaskPhrase.Resolution.Scoring;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>
/// Measures the scoring strategies on CLINC150 (Larson et al., 2019, "An Evaluation Dataset for Intent Classification
/// and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0) with the protocol of docs/clinc150-strategies.md: registries
/// of the first k training queries per intent, validation split in alternating halves A and B per intent, thresholds
/// and the strategy's settings chosen on A (most in-scope accuracy with false accepts ≤ 10 % and wrong task ≤ 5 %),
/// reported on B. Prints the table of the document.
/// </summary>
[Collection(ModelCollection.Name)]
public class ClincStrategyMeasurement(ModelFixture fixture, ITestOutputHelper output)
{
    internal const double FalseAcceptBudget = 0.10, WrongTaskBudget = 0.05;

    /// <summary>Resolves every validation row with permissive thresholds and returns halves A and B.</summary>
    internal static (List<ScoredProbe> A, List<ScoredProbe> B, double Closed) Score(TaskResolver resolver)
    {
        var val = ClincEmbeddings.ValidationHalves();
        var results = resolver.ResolveMany(val.Select(v => v.Text).ToList());
        var a = new List<ScoredProbe>();
        var b = new List<ScoredProbe>();
        int closed = 0, ins = 0;
        for (int i = 0; i < val.Count; i++)
        {
            var p = ScoredProbe.From(val[i].Expect, results[i]);
            (val[i].Half == 0 ? a : b).Add(p);
            if (p.InScope) { ins++; if (p.TopCorrect) closed++; }
        }
        return (a, b, closed / (double)ins);
    }

    internal static ResolverOptions Permissive(ScoringStrategy scoring, LearnedScoringOptions? learned = null) => new()
    {
        Scoring = scoring,
        AcceptOverride = -1,
        MarginOverride = 0,
        Learned = learned ?? LearnedScoringOptions.Default,
    };

    private sealed record Row(int K, string Strategy, string Setting, OperatingPoint OnA, OperatingPoint OnB, double Closed);

    [MeasurementFact]
    [Trait("tier", "measure")]
    public void Measure_StrategiesOnHeldOutHalf_PrintsTable()
    {
        var gen = ClincEmbeddings.Generator(fixture);
        var rows = new List<Row>();
        var log = new StringBuilder();
        foreach (int k in new[] { 10, 20 })
        {
            var registry = ClincRegistry.Build(k);
            var candidates = new List<Row>();
            void Try(string strategy, string setting, TaskResolver resolver)
            {
                var (a, b, closed) = Score(resolver);
                var onA = HalfSplitTuner.Tune(a, FalseAcceptBudget, WrongTaskBudget);
                candidates.Add(new Row(k, strategy, setting, onA, OperatingPoint.Evaluate(b, onA.Accept, onA.Margin), closed));
                log.AppendLine(CultureInfo.InvariantCulture, $"k={k} {strategy} {setting}: closed {closed:P1}, A {onA.Accuracy:P1}/{onA.WrongTaskRate:P1}/{onA.FalseAcceptRate:P1} at {onA.Accept:0.000}/{onA.Margin:0.000}");
            }
            Try("best-phrase", "—", TaskResolver.Create(registry, gen, Permissive(ScoringStrategy.BestPhrase)));
            Try("centroid", "—", TaskResolver.Create(registry, gen, Permissive(ScoringStrategy.Centroid)));
            foreach (double? lambda in new double?[] { null, 0.5 })
            {
                var resolver = TaskResolver.Create(registry, gen, Permissive(ScoringStrategy.Whitened, new() { Shrinkage = lambda }));
                Try("whitened", lambda is null ? "λ Ledoit–Wolf" : $"λ {lambda}", resolver);
            }
            foreach (double l2 in new[] { 1e-3, 1e-2, 1e-1 })
            {
                var sw = Stopwatch.StartNew();
                var trained = TaskResolver.Create(registry, gen, Permissive(ScoringStrategy.Head, new() { L2 = l2 }));
                var head = trained.Head!;
                log.AppendLine(CultureInfo.InvariantCulture, $"k={k} head L2 {l2}: resolver with training {sw.Elapsed.TotalSeconds:0.0} s, {head.Iterations} iterations, loss {head.TrainingLoss:0.0000}");
                foreach (double t in new[] { 1.0, 2.0, 4.0 })
                    Try("head", $"L2 {l2}, T {t}", trained.WithHead(head.WithTemperature(t)));
            }
            // Per strategy, the setting with the most correct acceptances on A (ties: fewer errors on A).
            foreach (var g in candidates.GroupBy(c => c.Strategy))
                rows.Add(g.OrderByDescending(c => c.OnA.Correct).ThenBy(c => c.OnA.Wrong + c.OnA.FalseAccepts).First());
        }
        output.WriteLine(log.ToString());
        output.WriteLine(Table(rows));
        File.WriteAllText(Path.Combine(Path.GetTempPath(), "clinc150-strategies.md"), log + "\n" + Table(rows));
        foreach (var r in rows)
        {
            Assert.True(r.OnA.FalseAccepts <= FalseAcceptBudget * r.OnA.OutOfScope && r.OnA.Wrong <= WrongTaskBudget * r.OnA.InScope, r.ToString());
            Assert.Equal((1500, 50), (r.OnB.InScope, r.OnB.OutOfScope));
        }
    }

    private static string Table(List<Row> rows)
    {
        var sb = new StringBuilder();
        sb.AppendLine("| phrases | strategy | setting (chosen on A) | accept | margin | closed-set acc. (all val) | B in-scope accuracy | B wrong task | B false accept |");
        sb.AppendLine("| --- | --- | --- | --- | --- | --- | --- | --- | --- |");
        foreach (var r in rows)
            sb.AppendLine(CultureInfo.InvariantCulture,
                $"| {r.K} | {r.Strategy} | {r.Setting} | {r.OnA.Accept:0.000} | {r.OnA.Margin:0.000} | {r.Closed:P1} | {Rate(r.OnB.Correct, r.OnB.InScope)} | {Rate(r.OnB.Wrong, r.OnB.InScope)} | {Rate(r.OnB.FalseAccepts, r.OnB.OutOfScope)} |");
        return sb.ToString();
    }

    /// <summary>A rate with its count and 95 % Wilson score interval (Wilson, 1927), as product.md asks.</summary>
    internal static string Rate(int hits, int n)
    {
        const double z = 1.96;
        double p = hits / (double)n, denom = 1 + z * z / n;
        double centre = (p + z * z / (2 * n)) / denom, half = z * Math.Sqrt(p * (1 - p) / n + z * z / (4.0 * n * n)) / denom;
        return string.Create(CultureInfo.InvariantCulture, $"{100 * p:0.0} % ({hits}/{n}; {100 * (centre - half):0.0}–{100 * (centre + half):0.0})");
    }
}
