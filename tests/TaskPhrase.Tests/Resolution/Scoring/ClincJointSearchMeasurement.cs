using System.Diagnostics;
using System.Globalization;
using System.Text;
using TaskPhrase.Evaluation;
using TaskPhrase.Resolution;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>
/// The production joint search (<see cref="ScoringSearch"/>, what <c>taskphrase tune</c> runs) on CLINC150 (Larson et al.,
/// 2019, "An Evaluation Dataset for Intent Classification and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0) with
/// the protocol of docs/clinc150-strategies.md: registries of the first k training queries per intent, the search on
/// validation half A (even rows per intent) under false accepts ≤ 10 % and wrong task ≤ 5 %, the chosen rule then
/// applied unchanged to half B (odd rows). Half B never enters the choice; its figures are printed for every setting
/// only to show how each one generalises: for the chosen setting and for the best-on-A setting of each strategy (all
/// settings when <c>TASKPHRASE_CLINC_ALL_B=1</c>; each head setting on B costs a training). k from <c>TASKPHRASE_CLINC_K</c>
/// (comma-separated, default 10); lines are also appended to the file <c>TASKPHRASE_MEASURE_LOG</c> when set.
/// <para>Variants (<c>TASKPHRASE_CLINC_VARIANTS</c>, comma-separated, default <c>base</c>) differ in what the dataset's
/// 100 out-of-scope training queries (<c>oos_train</c>, disjoint from validation) are used for; validation rows never
/// enter a registry and half B never enters the choice:</para>
/// <list type="bullet">
/// <item><c>base</c>: not used (the documented protocol).</item>
/// <item><c>lookalike-N</c>: all of them become <c>must_reject</c> look-alikes of the N tasks with the nearest centroid
/// (<see cref="ClincRegistry.WithLookAlikes"/>); the head trains them as its look-alike class.</item>
/// <item><c>probes</c>: all of them join half A as out-of-scope tuning probes (150 instead of 50); registry unchanged.</item>
/// <item><c>split-N</c>: even rows as look-alikes (N nearest tasks), odd rows as tuning probes; no row is both.</item>
/// </list>
/// <para><c>TASKPHRASE_CLINC_STRATEGIES</c> (comma-separated) restricts the grid as <c>tune --strategies</c> does;
/// <c>TASKPHRASE_CLINC_FA</c> sets the false-accept budget on half A (default 0.10); <c>TASKPHRASE_CLINC_MODEL</c> names
/// another model directory to embed with (e.g. one written by <c>taskphrase pool-layers</c>; default the bundled model);
/// <c>TASKPHRASE_CLINC_OVERRIDES=0</c> turns per-task accept overrides off; <c>TASKPHRASE_CLINC_CONSERVATIVE=1</c> reads
/// both budgets by their upper 95 % Wilson bounds (<c>tune --conservative</c>); <c>TASKPHRASE_CLINC_SWAP=1</c> runs the
/// second fold (search on half B, audit on half A; the printed "A" and "B" columns then mean tuning and audit half);
/// <c>TASKPHRASE_CLINC_TEMPERATURES</c> (comma-separated) replaces the head's temperatures in the grid.</para>
/// </summary>
[Collection(ModelCollection.Name)]
public class ClincJointSearchMeasurement(ModelFixture fixture, ITestOutputHelper output)
{
    internal static (List<ProbeCase> A, List<ProbeCase> B) Halves()
    {
        var a = new List<ProbeCase>();
        var b = new List<ProbeCase>();
        foreach (var (text, expect, half) in ClincEmbeddings.ValidationHalves()) (half == 0 ? a : b).Add(new ProbeCase(text, expect));
        // The second fold of the two-fold protocol: tune on half B, audit on half A.
        return Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_SWAP") == "1" ? (b, a) : (a, b);
    }

    internal static string Rate(RateEstimate r) => string.Create(CultureInfo.InvariantCulture,
        $"{100 * r.Value:0.0} % ({r.Count}/{r.Total}; {100 * r.CiLow:0.0}–{100 * r.CiHigh:0.0})");

    [MeasurementFact]
    [Trait("tier", "measure")]
    public void Measure_JointSearchOnHalfA_AuditOnHalfB_PrintsTable()
    {
        var ks = (Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_K") ?? "10").Split(',').Select(s => int.Parse(s, CultureInfo.InvariantCulture));
        var (halfA, halfB) = Halves();
        double falseAcceptBudget = double.Parse(Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_FA") ?? "0.10", CultureInfo.InvariantCulture);
        var budgets = new TuningBudgets(falseAcceptBudget, 0.05) { UseConfidenceBound = Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_CONSERVATIVE") == "1" };
        var table = new StringBuilder();
        string? logPath = Environment.GetEnvironmentVariable("TASKPHRASE_MEASURE_LOG");
        bool allB = Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_ALL_B") == "1";
        void Log(string line)
        {
            output.WriteLine(line);
            if (logPath is { Length: > 0 }) File.AppendAllText(logPath, line + Environment.NewLine);
        }
        var variants = (Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_VARIANTS") ?? "base").Split(',', StringSplitOptions.TrimEntries | StringSplitOptions.RemoveEmptyEntries);
        string? strategies = Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_STRATEGIES");
        var grid = ScoringCandidate.DefaultGrid(strategies is { Length: > 0 } ? strategies.Split(',') : null);
        if (Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_TEMPERATURES") is { Length: > 0 } temps)
        {
            // The head settings at other temperatures than the default grid's (same L2 values and probability weights).
            var ts = temps.Split(',').Select(t => double.Parse(t, CultureInfo.InvariantCulture)).ToList();
            grid = grid.Where(c => c.Strategy != "head")
                .Concat(from l2 in ScoringCandidate.DefaultL2 from t in ts from w in ScoringCandidate.DefaultProbabilityWeights
                        select new ScoringCandidate("head", new TaskPhrase.Registry.ScoringParameters { L2 = l2, Temperature = t, ProbabilityWeight = w == 0.5 ? null : w }))
                .ToList();
        }
        using var other = Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_MODEL") is { Length: > 0 } dir ? TaskPhrase.Onnx.OnnxEmbedder.Create(dir) : null;
        Microsoft.Extensions.AI.IEmbeddingGenerator<string, Microsoft.Extensions.AI.Embedding<float>> embedder =
            other is null ? fixture.Embedder : new TaskPhrase.Tests.TestDoubles.CachingEmbeddingGenerator(other);
        if (other is not null) Log($"model {other.Model.Id} ({other.Model.Dimensions} dimensions)");
        foreach (string variant in variants)
        foreach (int k in ks)
        {
            var (registry, tuning) = Variant(variant, ClincRegistry.Build(k), halfA, other is null ? ClincEmbeddings.Generator(fixture) : embedder);
            string tag = (variant == "base" ? $"{k}" : $"{k} {variant}") + (falseAcceptBudget == 0.10 ? "" : string.Create(CultureInfo.InvariantCulture, $" FA≤{falseAcceptBudget:0.##}"))
                + (budgets.UseConfidenceBound ? " conservative" : "") + (Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_SWAP") == "1" ? " (B→A)" : "");
            Log($"k={tag}: {registry.Tasks.Sum(t => t.MustReject.Count)} look-alikes, tuning suite {tuning.Count} probes ({tuning.Count(p => !p.IsInScope)} out of scope)");
            var watch = Stopwatch.StartNew();
            var tuner = Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_OVERRIDES") == "0" ? new ThresholdTuner(new TuningOptions { AllowOverrides = false }) : null;
            var search = ScoringSearch.Run(registry, embedder, tuning, budgets, grid, tuner,
                progress: p =>
                {
                    if (p.Result is null) Log($"k={tag} [{p.Index + 1}/{p.Count}] {p.Candidate.Label} at {watch.Elapsed.TotalSeconds:0} s");
                    else Log(string.Create(CultureInfo.InvariantCulture, $"k={tag}   A: {100 * p.Result.Metrics.InScopeAccuracy.Value:0.0} % / {100 * p.Result.Metrics.WrongTaskRate.Value:0.0} % / {100 * p.Result.Metrics.FalseAcceptRate.Value:0.0} %{(p.Result.Feasible ? "" : " (infeasible)")}"));
                });
            Log($"k={tag}: search took {watch.Elapsed.TotalSeconds:0} s");
            var bestPerStrategy = search.Outcomes.GroupBy(o => o.Candidate.Strategy)
                .Select(g => g.Aggregate((x, y) => ScoringSearch.IsBetter(y.Result, x.Result) ? y : x).Candidate).ToHashSet();
            var memo = new MemoizingEmbeddingGenerator(embedder);
            var textsB = halfB.Select(p => p.Utterance).ToList();
            foreach (var o in search.Outcomes)
            {
                if (!allB && !bestPerStrategy.Contains(o.Candidate) && o.Candidate != search.Chosen) continue;
                var resolver = TaskResolver.Create(o.Candidate.Apply(registry), memo);
                var res = resolver.ResolveMany(textsB);
                if (o.Candidate == search.Chosen)
                {
                    // Threshold-independent refusals of the chosen setting on the tuning suite (what look-alikes cost in scope).
                    var onA = resolver.ResolveMany(tuning.Select(p => p.Utterance).ToList());
                    string Guards(bool inScope) => string.Join(", ", tuning.Select((p, i) => (p, r: onA[i])).Where(x => x.p.IsInScope == inScope && x.r.Guard != RejectionReason.None)
                        .GroupBy(x => x.r.Guard).OrderBy(g => g.Key).Select(g => $"{g.Key} {g.Count()}"));
                    Log($"k={tag}: chosen setting's guard refusals on the tuning suite: in scope [{Guards(true)}], out of scope [{Guards(false)}]");
                }
                var audit = TuningMetrics.Evaluate(halfB.Select((p, i) => TaskPhrase.Evaluation.ScoredProbe.From(p, res[i])), o.Result.Rule);
                var m = o.Result.Metrics;
                string mark = o.Candidate == search.Chosen ? " **chosen**" : "";
                string line = string.Create(CultureInfo.InvariantCulture,
                    $"| {tag} | {o.Candidate.Label}{mark} | {o.Result.Accept:0.000} | {o.Result.Margin:0.000} | {o.Result.AcceptOverrides.Count} | {100 * m.InScopeAccuracy.Value:0.0} % / {100 * m.WrongTaskRate.Value:0.0} % / {100 * m.FalseAcceptRate.Value:0.0} %{(o.Result.Feasible ? "" : " (infeasible)")} | {Rate(audit.InScopeAccuracy)} | {Rate(audit.WrongTaskRate)} | {Rate(audit.FalseAcceptRate)} |");
                table.AppendLine(line);
                Log(line);
            }
        }
        output.WriteLine("| k | setting | accept | margin | overrides | A accuracy / wrong / false accept | B in-scope accuracy | B wrong task | B false accept |");
        output.WriteLine("| --- | --- | --- | --- | --- | --- | --- | --- | --- |");
        output.WriteLine(table.ToString());
    }

    /// <summary>The registry and tuning suite of a variant (see the class remarks).</summary>
    private static (TaskPhrase.Registry.TaskRegistry Registry, List<ProbeCase> Tuning) Variant(string variant, TaskPhrase.Registry.TaskRegistry registry, List<ProbeCase> halfA,
        Microsoft.Extensions.AI.IEmbeddingGenerator<string, Microsoft.Extensions.AI.Embedding<float>> gen)
    {
        var oos = Clinc150.Split("oos_train").Select(r => r.Text).ToList();
        var probes = (IEnumerable<string> texts) => halfA.Concat(texts.Select(t => new ProbeCase(t, ProbeCase.Reject))).ToList();
        if (variant == "base") return (registry, halfA);
        if (variant == "probes") return (registry, probes(oos));
        if (variant.StartsWith("lookalike-", StringComparison.Ordinal))
            return (ClincRegistry.WithLookAlikes(registry, oos, gen, int.Parse(variant["lookalike-".Length..], CultureInfo.InvariantCulture)), halfA);
        if (variant.StartsWith("split-", StringComparison.Ordinal))
        {
            var even = oos.Where((_, i) => i % 2 == 0).ToList();
            var odd = oos.Where((_, i) => i % 2 == 1);
            return (ClincRegistry.WithLookAlikes(registry, even, gen, int.Parse(variant["split-".Length..], CultureInfo.InvariantCulture)), probes(odd));
        }
        throw new ArgumentException($"TASKPHRASE_CLINC_VARIANTS: unknown variant '{variant}'; use base, lookalike-N, probes or split-N.");
    }
}
