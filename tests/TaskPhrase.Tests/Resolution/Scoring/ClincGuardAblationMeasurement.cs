using System.Globalization;
using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>
/// What the threshold-independent guards (negated, hazard, look-alike) cost in scope on CLINC150 (Larson et al., 2019,
/// "An Evaluation Dataset for Intent Classification and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0), with the
/// protocol of docs/clinc150-strategies.md: registries of the first 10 training queries per intent, thresholds tuned
/// on validation half A under false accepts ≤ 10 % and wrong task ≤ 5 %, the rule applied unchanged to half B. Each
/// setting's resolutions are computed once; the variants then treat refusals by the named guards as if the guard had
/// not fired (the probe falls to the thresholds) and re-tune on A. This is an upper bound on what any narrower guard
/// could win, not a proposal to drop the guards. Settings: the centroid and the head setting the joint search chose
/// (L2 0.01, temperature 1, α 0.25).
/// </summary>
[Collection(ModelCollection.Name)]
public class ClincGuardAblationMeasurement(ModelFixture fixture, ITestOutputHelper output)
{
    [MeasurementFact]
    [Trait("tier", "measure")]
    public void Measure_GuardAblation_TunedOnHalfA_AuditedOnHalfB()
    {
        var (halfA, halfB) = ClincJointSearchMeasurement.Halves();
        var registry = ClincRegistry.Build(10);
        var generator = ClincEmbeddings.Generator(fixture);
        var budgets = new TuningBudgets(0.10, 0.05);
        var tuner = new ThresholdTuner();
        var settings = new[]
        {
            new ScoringCandidate("centroid"),
            new ScoringCandidate("head", new ScoringParameters { L2 = 0.01, Temperature = 1, ProbabilityWeight = 0.25 }),
        };
        var variants = new (string Name, RejectionReason[] Lifted)[]
        {
            ("all guards", []),
            ("negated lifted", [RejectionReason.Negated]),
            ("negated, hazard lifted", [RejectionReason.Negated, RejectionReason.Hazard]),
            ("negated, hazard, look-alike lifted", [RejectionReason.Negated, RejectionReason.Hazard, RejectionReason.LookAlike]),
        };
        output.WriteLine("| setting | guards | A accuracy / wrong / FA | B in-scope accuracy | B wrong task | B false accept |");
        output.WriteLine("| --- | --- | --- | --- | --- | --- |");
        foreach (var setting in settings)
        {
            var resolver = TaskResolver.Create(setting.Apply(registry), generator);
            var onA = resolver.ResolveMany(halfA.Select(p => p.Utterance).ToList());
            var onB = resolver.ResolveMany(halfB.Select(p => p.Utterance).ToList());
            foreach (var half in new[] { ("A", halfA, onA), ("B", halfB, onB) })
                output.WriteLine($"{setting.Label} half {half.Item1}: in-scope guard refusals " + string.Join(", ", half.Item2
                    .Select((p, i) => (p, r: half.Item3[i])).Where(x => x.p.IsInScope && x.r.Guard != RejectionReason.None)
                    .GroupBy(x => (x.r.Guard, Right: x.r.Task?.Id == x.p.Expect)).OrderBy(g => g.Key.Guard).ThenBy(g => g.Key.Right)
                    .Select(g => $"{g.Key.Guard} ({(g.Key.Right ? "right" : "wrong")} task) {g.Count()}")));
            foreach (var (name, lifted) in variants)
            {
                List<TaskPhrase.Evaluation.ScoredProbe> Scored(IReadOnlyList<ProbeCase> set, IReadOnlyList<TaskPhrase.Resolution.Resolution> res) =>
                    set.Select((p, i) => TaskPhrase.Evaluation.ScoredProbe.From(p, res[i]) with
                    {
                        GuardRejected = res[i].Guard != RejectionReason.None && !lifted.Contains(res[i].Guard),
                    }).ToList();
                var tuned = tuner.TuneForBudgets(Scored(halfA, onA), budgets);
                Assert.True(tuned.Feasible, $"{setting.Label}, {name}: no feasible thresholds on half A");
                var audit = TuningMetrics.Evaluate(Scored(halfB, onB), tuned.Rule);
                var m = tuned.Metrics;
                output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                    $"| {setting.Label} | {name} | {100 * m.InScopeAccuracy.Value:0.0} % / {100 * m.WrongTaskRate.Value:0.0} % / {100 * m.FalseAcceptRate.Value:0.0} % | {ClincJointSearchMeasurement.Rate(audit.InScopeAccuracy)} | {ClincJointSearchMeasurement.Rate(audit.WrongTaskRate)} | {ClincJointSearchMeasurement.Rate(audit.FalseAcceptRate)} |"));
            }
        }
    }
}
