using System.Globalization;
using TaskPhrase.Evaluation;
using TaskPhrase.Onnx;
using TaskPhrase.Resolution;
using TaskPhrase.Tests.TestDoubles;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>
/// The joint search (centroid and head settings of <see cref="ScoringCandidate.DefaultGrid"/>) on CLINC150 (Larson et
/// al., 2019, "An Evaluation Dataset for Intent Classification and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0)
/// with layer-pooled variants of all-MiniLM-L6-v2 (<see cref="LayerPooledModel"/>), protocol of
/// docs/clinc150-strategies.md: registries of the first k training queries per intent, the search on validation half A
/// under false accepts ≤ 10 % and wrong task ≤ 5 %, the chosen rule applied unchanged to half B; the best centroid
/// setting is printed too. Layer sets from <c>TASKPHRASE_CLINC_LAYERS</c> (semicolon-separated, each comma-separated;
/// <c>6</c> is the source model; default <c>6;3,6;4,6;5,6;4,5,6</c>), k from <c>TASKPHRASE_CLINC_K</c> (default 10).
/// </summary>
public class ClincLayerPoolingMeasurement(ITestOutputHelper output)
{
    [MeasurementFact]
    [Trait("tier", "measure")]
    public void Measure_LayerPooledModels_JointSearchOnHalfA_AuditOnHalfB()
    {
        var sets = (Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_LAYERS") ?? "6;3,6;4,6;5,6;4,5,6").Split(';', StringSplitOptions.RemoveEmptyEntries)
            .Select(s => s.Split(',').Select(l => int.Parse(l, CultureInfo.InvariantCulture)).ToArray()).ToList();
        var ks = (Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_K") ?? "10").Split(',').Select(s => int.Parse(s, CultureInfo.InvariantCulture)).ToList();
        var (halfA, halfB) = ClincJointSearchMeasurement.Halves();
        var budgets = new TuningBudgets(0.10, 0.05);
        string root = Directory.CreateTempSubdirectory("taskphrase-layer-measure-").FullName;
        output.WriteLine("| k | layers | setting | A accuracy / wrong / FA | B in-scope accuracy | B wrong task | B false accept |");
        output.WriteLine("| --- | --- | --- | --- | --- | --- | --- |");
        try
        {
            foreach (var layers in sets)
            {
                string dir = layers is [6] ? BuiltInModels.MiniLmL6V2 : LayerPooledModel.Write(BuiltInModels.MiniLmL6V2, Path.Combine(root, string.Join("-", layers)), layers).OutputDirectory;
                using var embedder = OnnxEmbedder.Create(dir);
                var generator = new CachingEmbeddingGenerator(embedder);
                foreach (int k in ks)
                {
                    var registry = ClincRegistry.Build(k);
                    var search = ScoringSearch.Run(registry, generator, halfA, budgets, ScoringCandidate.DefaultGrid(["centroid", "head"]));
                    var textsB = halfB.Select(p => p.Utterance).ToList();
                    foreach (var o in search.Outcomes.Where(o => o.Candidate == search.Chosen || o.Candidate.Strategy == "centroid"))
                    {
                        var res = TaskResolver.Create(o.Candidate.Apply(registry), generator).ResolveMany(textsB);
                        var audit = TuningMetrics.Evaluate(halfB.Select((p, i) => TaskPhrase.Evaluation.ScoredProbe.From(p, res[i])), o.Result.Rule);
                        var m = o.Result.Metrics;
                        output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                            $"| {k} | {string.Join(", ", layers)} | {o.Candidate.Label}{(o.Candidate == search.Chosen ? " **chosen**" : "")} | {100 * m.InScopeAccuracy.Value:0.0} % / {100 * m.WrongTaskRate.Value:0.0} % / {100 * m.FalseAcceptRate.Value:0.0} % | {ClincJointSearchMeasurement.Rate(audit.InScopeAccuracy)} | {ClincJointSearchMeasurement.Rate(audit.WrongTaskRate)} | {ClincJointSearchMeasurement.Rate(audit.FalseAcceptRate)} |"));
                    }
                }
            }
        }
        finally
        {
            Directory.Delete(root, recursive: true);
        }
    }
}
