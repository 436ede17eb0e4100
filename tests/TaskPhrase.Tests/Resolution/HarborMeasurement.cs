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
        foreach (var hazard in new[] { false, true })
        {
            var strategy = ScoringStrategy.Centroid;
            var resolver = TaskResolver.Create(registry, fixture.Embedder, new ResolverOptions { Scoring = strategy, HazardCheck = hazard });
            var res = resolver.ResolveMany(suite.Cases.Select(c => c.Utterance).ToList());
            var report = AuditEvaluator.Evaluate(suite.Cases, res, AuditContext.Create(registry, fixture.Embedder.Model, suite, DateTimeOffset.UnixEpoch));
            foreach (var k in report.ByKind) output.WriteLine($"  hazard={hazard} {k.Kind}: {k.Rate.Count}/{k.Probes}");
            output.WriteLine($"hazard={hazard} {strategy}: acc {report.InScopeAccuracy.Value:P1} wrong {report.WrongTaskRate.Value:P1} far {report.FalseAcceptRate.Value:P1} frr {report.FalseRejectRate.Value:P1} auroc {report.Auroc:0.000}");
        }
    }
}
