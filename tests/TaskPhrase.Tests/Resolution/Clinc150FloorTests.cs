using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Tests.TestDoubles;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// Quality floors on CLINC150 (Larson et al., 2019, "An Evaluation Dataset for Intent Classification and Out-of-Scope
/// Prediction", EMNLP-IJCNLP; CC BY 3.0): a registry from the first 10 training queries of each of the 150 intents,
/// resolved against the validation split (3,000 in-scope, 100 out-of-scope queries). Floors sit about two points
/// below the figures measured when they were set (README, "CLINC150").
/// </summary>
[Collection(ModelCollection.Name)]
[Trait("tier", "slow")]
public class Clinc150FloorTests(ModelFixture fixture, ITestOutputHelper output)
{
    private static readonly Lazy<List<ProbeCase>> Validation = new(() =>
        Clinc150.Split("val").Concat(Clinc150.Split("oos_val"))
            .Select(r => new ProbeCase(r.Text, ClincRegistry.TaskIdOf(r.Intent)))
            .ToList());

    private static readonly object Gate = new();
    private static readonly Dictionary<ScoringStrategy, IReadOnlyList<TaskPhrase.Resolution.Resolution>> Cache = new();

    private IReadOnlyList<TaskPhrase.Resolution.Resolution> Resolve(ScoringStrategy strategy)
    {
        lock (Gate)
        {
            if (Cache.TryGetValue(strategy, out var cached)) return cached;
            SharedGenerator ??= new CachingEmbeddingGenerator(fixture.Embedder);
            var resolver = TaskResolver.Create(ClincRegistry.Build(10), SharedGenerator, new ResolverOptions { Scoring = strategy });
            var result = resolver.ResolveMany(Validation.Value.Select(p => p.Utterance).ToList());
            Cache[strategy] = result;
            return result;
        }
    }

    private static CachingEmbeddingGenerator? SharedGenerator;

    [Theory]
    [InlineData(ScoringStrategy.Centroid, 0.83)]
    [InlineData(ScoringStrategy.BestPhrase, 0.76)]
    public void ClosedSetTopOne_TenPhrasesPerIntent_StaysAboveFloor(ScoringStrategy strategy, double floor)
    {
        var probes = Validation.Value;
        var res = Resolve(strategy);
        int inScope = 0, correct = 0;
        for (int i = 0; i < probes.Count; i++)
        {
            if (!probes[i].IsInScope) continue;
            inScope++;
            if (res[i].Candidates.Count > 0 && res[i].Candidates[0].TaskId == probes[i].Expect) correct++;
        }
        double accuracy = (double)correct / inScope;
        output.WriteLine($"{strategy}: closed-set top-1 {accuracy:P1} ({correct}/{inScope})");
        Assert.True(accuracy >= floor, $"{strategy} closed-set accuracy {accuracy:P1} fell below the floor {floor:P0}");
    }

    [Fact]
    public void TunedOnHalf_AuditedOnOtherHalf_MeetsFloors()
    {
        // Tune on even rows, audit on odd rows (a deterministic split of the validation data, both halves
        // keep every intent and half of the out-of-scope queries).
        var probes = Validation.Value;
        var res = Resolve(ResolverOptions.DefaultScoring);
        var scored = probes.Select((p, i) => ScoredProbe.From(p, res[i])).ToList();
        var tuneHalf = scored.Where((_, i) => i % 2 == 0).ToList();
        var auditHalf = scored.Where((_, i) => i % 2 == 1).ToList();
        var tuned = new ThresholdTuner(new TuningOptions { AllowOverrides = false }).TuneForBudgets(tuneHalf, new TuningBudgets(0.10, 0.05));
        var audit = TuningMetrics.Evaluate(auditHalf, tuned.Rule);
        output.WriteLine($"tuned accept {tuned.Accept:0.000} margin {tuned.Margin:0.000}; audit half: accuracy {audit.InScopeAccuracy.Value:P1}, wrong task {audit.WrongTaskRate.Value:P1}, false accepts {audit.FalseAcceptRate.Value:P1}");
        Assert.True(tuned.Feasible);
        // Measured when set (centroid, accept 0.378, margin 0.052): accuracy 70.7 %, wrong task 5.3 %, false accepts 12.0 %
        // (6 of 50: the out-of-scope half is small, so its floor is loose).
        Assert.True(audit.InScopeAccuracy.Value >= 0.68, $"in-scope accuracy {audit.InScopeAccuracy.Value:P1}");
        Assert.True(audit.FalseAcceptRate.Value <= 0.20, $"false-accept rate {audit.FalseAcceptRate.Value:P1}");
        Assert.True(audit.WrongTaskRate.Value <= 0.075, $"wrong-task rate {audit.WrongTaskRate.Value:P1}");
    }

    [Fact]
    public void JointSearch_TunedOnHalfA_AuditedOnHalfB_MeetsFloors()
    {
        // What 'taskphrase tune' chose on half A under false accepts <= 10 % and wrong task <= 5 % when the full default
        // search (35 settings, ClincJointSearchMeasurement) ran: the head at L2 0.01, temperature 1, probability weight 0.25.
        // Re-tuned here for that setting alone (the search tunes every setting independently, so this gives the same
        // thresholds and overrides), then applied unchanged to half B.
        var (halfA, halfB) = TaskPhrase.Tests.Resolution.Scoring.ClincJointSearchMeasurement.Halves();
        var registry = ClincRegistry.Build(10);
        var chosen = new ScoringCandidate("head", new ScoringParameters { L2 = 0.01, Temperature = 1, ProbabilityWeight = 0.25 });
        var search = ScoringSearch.Run(registry, fixture.Embedder, halfA, new TuningBudgets(0.10, 0.05), [chosen]);
        Assert.True(search.Result.Feasible);
        var resolver = TaskResolver.Create(chosen.Apply(registry), fixture.Embedder);
        var res = resolver.ResolveMany(halfB.Select(p => p.Utterance).ToList());
        var audit = TuningMetrics.Evaluate(halfB.Select((p, i) => ScoredProbe.From(p, res[i])), search.Result.Rule);
        output.WriteLine($"accept {search.Result.Accept:0.000}, margin {search.Result.Margin:0.000}, {search.Result.AcceptOverrides.Count} overrides; " +
            $"half A: accuracy {search.Result.Metrics.InScopeAccuracy}; half B: accuracy {audit.InScopeAccuracy}, wrong task {audit.WrongTaskRate}, false accepts {audit.FalseAcceptRate}");
        // Measured when set (docs/clinc150-strategies.md, "Joint search"): half B accuracy 75.5 % (1132/1500), wrong task
        // 5.9 % (88/1500), false accepts 12 % (6 of 50; each one moves the rate by 2 points, so that ceiling is loose).
        Assert.True(audit.InScopeAccuracy.Value >= 0.745, $"in-scope accuracy {audit.InScopeAccuracy.Value:P1}");
        Assert.True(audit.WrongTaskRate.Value <= 0.065, $"wrong-task rate {audit.WrongTaskRate.Value:P1}");
        Assert.True(audit.FalseAcceptRate.Value <= 0.16, $"false-accept rate {audit.FalseAcceptRate.Value:P1}");
    }

    [Fact]
    public void ConservativeBudgets_100Phrases_HoldTheFalseAcceptBudgetOnTheHeldOutHalf()
    {
        // tune --conservative (both budgets read by the upper end of their 95 % Wilson intervals) with 100 approved phrases
        // per intent, the setting the search chose (docs/clinc150-strategies.md, "Both folds": head, L2 0.001, temperature
        // 2, probability weight 0.25), tuned on half A plus the dataset's 100 out-of-scope training queries (oos_train,
        // never validation rows; 150 out-of-scope probes, so at most 7 false accepts), then applied unchanged to half B.
        var (halfA, halfB) = TaskPhrase.Tests.Resolution.Scoring.ClincJointSearchMeasurement.Halves();
        var tuning = halfA.Concat(Clinc150.Split("oos_train").Select(r => new ProbeCase(r.Text, ProbeCase.Reject))).ToList();
        var registry = ClincRegistry.Build(100);
        var chosen = new ScoringCandidate("head", new ScoringParameters { L2 = 0.001, Temperature = 2, ProbabilityWeight = 0.25 });
        var budgets = new TuningBudgets(0.10, 0.05) { UseConfidenceBound = true };
        var search = ScoringSearch.Run(registry, fixture.Embedder, tuning, budgets, [chosen]);
        Assert.True(search.Result.Feasible);
        Assert.True(search.Result.Metrics.FalseAcceptRate.Count <= 7, $"{search.Result.Metrics.FalseAcceptRate.Count} false accepts of 150 on the tuning suite");
        var resolver = TaskResolver.Create(chosen.Apply(registry), fixture.Embedder);
        var res = resolver.ResolveMany(halfB.Select(p => p.Utterance).ToList());
        var audit = TuningMetrics.Evaluate(halfB.Select((p, i) => ScoredProbe.From(p, res[i])), search.Result.Rule);
        output.WriteLine($"accept {search.Result.Accept:0.000}, margin {search.Result.Margin:0.000}, {search.Result.AcceptOverrides.Count} overrides; " +
            $"half B: accuracy {audit.InScopeAccuracy}, wrong task {audit.WrongTaskRate}, false accepts {audit.FalseAcceptRate}");
        // Measured when set (bundled model): half B accuracy 90.3 % (1355/1500), wrong task 1.9 % (28/1500), false
        // accepts 2 % (1 of 50). The point of the mode is the first check: on queries it never saw the point rate stays
        // within the 10 % budget (50 queries cannot show it by its bound; this catches a regression that lets several through).
        Assert.True(audit.FalseAcceptRate.Value <= 0.10, $"false-accept rate {audit.FalseAcceptRate.Value:P1}");
        Assert.True(audit.InScopeAccuracy.Value >= 0.885, $"in-scope accuracy {audit.InScopeAccuracy.Value:P1}");
        Assert.True(audit.WrongTaskRate.Value <= 0.03, $"wrong-task rate {audit.WrongTaskRate.Value:P1}");
    }
}
