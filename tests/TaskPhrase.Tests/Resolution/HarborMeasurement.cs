using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution;

[Collection(ModelCollection.Name)]
public class HarborMeasurement(ModelFixture fixture, ITestOutputHelper output)
{
    [Theory]
    [InlineData("probes.csv")]
    [InlineData("probes-holdout.csv")]
    public void Measure(string file)
    {
        var registry = RegistryLoader.Load(TestPaths.Example("harbor-street", "registry.yaml"));
        var suite = ProbeSuite.Load(TestPaths.Example("harbor-street", file));
        foreach (var strategy in new[] { ScoringStrategy.Centroid, ScoringStrategy.BestPhrase })
        {
            var resolver = TaskResolver.Create(registry, fixture.Embedder, new ResolverOptions { Scoring = strategy });
            var res = resolver.ResolveMany(suite.Cases.Select(c => c.Utterance).ToList());
            var report = AuditEvaluator.Evaluate(suite.Cases, res, AuditContext.Create(registry, fixture.Embedder.Model, suite, DateTimeOffset.UnixEpoch));
            output.WriteLine($"{strategy}: acc {report.InScopeAccuracy.Value:P1} wrong {report.WrongTaskRate.Value:P1} far {report.FalseAcceptRate.Value:P1} frr {report.FalseRejectRate.Value:P1} auroc {report.Auroc:0.000}");
            if (strategy != ScoringStrategy.Centroid) continue;
            foreach (var (c, r) in suite.Cases.Zip(res))
            {
                bool ok = c.IsInScope ? r.Outcome == ResolutionOutcome.Accepted && r.Task?.Id == c.Expect : r.Outcome != ResolutionOutcome.Accepted;
                if (!ok && (!c.IsInScope || r.Reason is RejectionReason.Hazard or RejectionReason.LookAlike or RejectionReason.Negated)) output.WriteLine($"  FAIL [{c.Kind}] {c.Utterance} -> {ResolutionJson.Name(r.Outcome)} {r.Task?.Id} {ResolutionJson.Name(r.Reason)} {r.Score:0.000} m{r.Margin:0.000} {(r.HazardWord ?? r.NegationCue)} {r.Detail} unc[{string.Join(',', r.UncoveredWords)}] (expect {c.Expect})");
            }
        }
    }
}
