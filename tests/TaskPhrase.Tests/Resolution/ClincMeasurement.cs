using TaskPhrase.Resolution;
using TaskPhrase.Tests.TestDoubles;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution;

[Collection(ModelCollection.Name)]
public class ClincMeasurement(ModelFixture fixture, ITestOutputHelper output)
{
    [Fact]
    public void Measure()
    {
        var gen = new CachingEmbeddingGenerator(fixture.Embedder);
        var val = Clinc150.Split("val").Concat(Clinc150.Split("oos_val")).ToList();
        foreach (var strategy in new[] { ScoringStrategy.Centroid })
        {
            var resolver = TaskResolver.Create(ClincRegistry.Build(10), gen, new ResolverOptions { Scoring = strategy, AcceptOverride = -1, MarginOverride = 0 });
            var res = resolver.ResolveMany(val.Select(v => v.Text).ToList());
            var rows = val.Zip(res).Select(p => (Expect: ClincRegistry.TaskIdOf(p.First.Intent), Top: p.Second.Candidates.Count > 0 ? p.Second.Candidates[0].TaskId : null, Score: p.Second.Score ?? -1, Margin: p.Second.Margin ?? 1, Guard: p.Second.Guard != RejectionReason.None)).ToList();
            var ins = rows.Where(r => r.Expect != "reject").ToList();
            var oos = rows.Where(r => r.Expect == "reject").ToList();
            double closed = ins.Count(r => r.Top == r.Expect) / (double)ins.Count;
            // threshold at 10% FAR on oos
            var oosScores = oos.Select(r => r.Score).OrderByDescending(s => s).ToList();
            float t = oosScores[(int)(0.10 * oos.Count)];
            double acc = ins.Count(r => r.Top == r.Expect && r.Score > t && !r.Guard) / (double)ins.Count;
            double wrong = ins.Count(r => r.Top != r.Expect && r.Score > t && !r.Guard) / (double)ins.Count;
            double far = oos.Count(r => r.Score > t && !r.Guard) / (double)oos.Count;
            int guards = rows.Count(r => r.Guard);
            foreach (var g in val.Zip(res).Where(p => p.Second.Guard != RejectionReason.None).GroupBy(p => p.Second.Guard))
                output.WriteLine($"  guard {g.Key}: {g.Count()} e.g. {string.Join(" | ", g.Take(40).Select(p => p.First.Text + " [" + (p.Second.HazardWord ?? p.Second.NegationCue ?? p.Second.Detail) + "]"))}");
            output.WriteLine($"{strategy}: closed-set {closed:P1}; at t={t:0.000}: acc {acc:P1} wrong {wrong:P1} far {far:P1}; guards fired {guards}");
        }
    }
}
