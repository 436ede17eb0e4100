using TaskPhrase.Evaluation;
using TaskPhrase.Resolution;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Quantization;

/// <summary>
/// The CLINC150 gate of the int8 model (Larson et al., 2019, "An Evaluation Dataset for Intent Classification and
/// Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0), with the protocol of <c>Clinc150FloorTests</c>: a registry
/// from the first 10 training queries of each of the 150 intents; the validation split (3,000 in-scope and 100
/// out-of-scope queries) resolved by each model; thresholds tuned on the fp32 model's even rows (budgets: wrong task
/// 10 %, false accept 5 %); both models audited on the odd rows at those same thresholds. The int8 audit figures must
/// be within 1 point of fp32's. (One out-of-scope query of the 50 in the audit half moves the false-accept rate by
/// 2 points; a flip there fails the gate.) The quantiser runs the same audit when given the dataset
/// (<c>QuantizationOptions.Clinc150Path</c>, as the fixture does) and records it in the card; both must agree.
/// </summary>
[Collection(QuantizedModelCollection.Name)]
[Trait("tier", "slow")]
public sealed class QuantizedClincGateTests(QuantizedModelFixture fixture, ITestOutputHelper output)
{
    /// <summary>Largest allowed difference of an audit rate (1 point).</summary>
    private const double Points = 0.01;

    private static List<ScoredProbe> Score(Microsoft.Extensions.AI.IEmbeddingGenerator<string, Microsoft.Extensions.AI.Embedding<float>> generator)
    {
        var probes = Clinc150.Split("val").Concat(Clinc150.Split("oos_val"))
            .Select(r => new ProbeCase(r.Text, ClincRegistry.TaskIdOf(r.Intent))).ToList();
        var resolver = TaskResolver.Create(ClincRegistry.Build(10), generator, new ResolverOptions { Scoring = ResolverOptions.DefaultScoring });
        var res = resolver.ResolveMany(probes.Select(p => p.Utterance).ToList());
        return probes.Select((p, i) => ScoredProbe.From(p, res[i])).ToList();
    }

    [Fact]
    public void Int8_ClincValidationAudit_WithinOnePointOfFp32AtTheSameOperatingPoint()
    {
        var int8 = fixture.Int8 ?? throw new InvalidOperationException(fixture.Result.Failure);
        var fp32Scored = Score(fixture.Fp32);
        var int8Scored = Score(int8);

        var tuned = new ThresholdTuner(new TuningOptions { AllowOverrides = false })
            .TuneForBudgets(fp32Scored.Where((_, i) => i % 2 == 0).ToList(), new TuningBudgets(0.10, 0.05));
        Assert.True(tuned.Feasible);
        var fp32 = TuningMetrics.Evaluate(fp32Scored.Where((_, i) => i % 2 == 1), tuned.Rule);
        var q8 = TuningMetrics.Evaluate(int8Scored.Where((_, i) => i % 2 == 1), tuned.Rule);
        int sameTop = fp32Scored.Zip(int8Scored).Count(p => p.First.BestTask == p.Second.BestTask);

        output.WriteLine($"operating point (tuned on fp32, even rows): accept {tuned.Accept:0.000} margin {tuned.Margin:0.000}");
        output.WriteLine($"fp32 audit: accuracy {fp32.InScopeAccuracy}, wrong task {fp32.WrongTaskRate}, false accept {fp32.FalseAcceptRate}");
        output.WriteLine($"int8 audit: accuracy {q8.InScopeAccuracy}, wrong task {q8.WrongTaskRate}, false accept {q8.FalseAcceptRate}");
        output.WriteLine($"same top task on {sameTop} of {fp32Scored.Count} validation queries");

        // The quantiser's own CLINC150 figures in the card agree with this independent computation.
        var recorded = fixture.Result.Quantization.Quality!.Clinc150;
        Assert.NotNull(recorded);
        Assert.Equal((tuned.Accept, tuned.Margin), ((float)recorded!.Accept, (float)recorded.Margin));
        Assert.Equal((fp32.InScope, fp32.OutOfScope), (recorded.InScope, recorded.OutOfScope));
        Assert.Equal(fp32.InScopeAccuracy.Value, recorded.Fp32!.InScopeAccuracy, 1e-6);
        Assert.Equal(fp32.WrongTaskRate.Value, recorded.Fp32.WrongTask, 1e-6);
        Assert.Equal(fp32.FalseAcceptRate.Value, recorded.Fp32.FalseAccept, 1e-6);
        Assert.Equal(q8.InScopeAccuracy.Value, recorded.Int8!.InScopeAccuracy, 1e-6);
        Assert.Equal(q8.WrongTaskRate.Value, recorded.Int8.WrongTask, 1e-6);
        Assert.Equal(q8.FalseAcceptRate.Value, recorded.Int8.FalseAccept, 1e-6);

        Assert.True(Math.Abs(q8.InScopeAccuracy.Value - fp32.InScopeAccuracy.Value) <= Points, $"in-scope accuracy int8 {q8.InScopeAccuracy} vs fp32 {fp32.InScopeAccuracy}");
        Assert.True(Math.Abs(q8.WrongTaskRate.Value - fp32.WrongTaskRate.Value) <= Points, $"wrong task int8 {q8.WrongTaskRate} vs fp32 {fp32.WrongTaskRate}");
        Assert.True(Math.Abs(q8.FalseAcceptRate.Value - fp32.FalseAcceptRate.Value) <= Points, $"false accept int8 {q8.FalseAcceptRate} vs fp32 {fp32.FalseAcceptRate}");
    }
}
