using System.Globalization;
using TaskPhrase.Resolution;
using TaskPhrase.Resolution.Scoring;
using TaskPhrase.Text;
using Xunit.Abstractions;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>
/// Whether a word-overlap channel adds to the learned head on CLINC150 (Larson et al., 2019; CC BY 3.0): registries of
/// the first k training queries per intent (k from <c>TASKPHRASE_CLINC_K</c>, default 10), the head's
/// task scores plus β times the cosine of the query's stems to each task's tf-idf vector (stems of the approved phrases,
/// stop words out, idf over tasks; tf-idf weighting is common practice). Printed per validation half, in-scope queries
/// only: closed-set top-1 accuracy, and the selective ceiling at 5 % wrong task: the most correct acceptances any single
/// confidence threshold reaches while accepted wrong tasks stay ≤ 5 % of the half, for three confidences (top score,
/// top-minus-runner-up margin, their sum). Out-of-scope queries and the guards are left out, so the ceiling is above what
/// the full decision rule can reach.
/// </summary>
[Collection(ModelCollection.Name)]
public class ClincLexicalChannelMeasurement(ModelFixture fixture, ITestOutputHelper output)
{
    private static List<string> Stems(string text) =>
        WordStemmer.Words(TextNormalizer.Normalize(text)).Where(w => !StopWords.Contains(w)).Select(WordStemmer.Stem).Distinct().ToList();

    [MeasurementFact]
    [Trait("tier", "measure")]
    public void Measure_HeadPlusWordOverlap_ClosedSetAndSelectiveCeiling()
    {
        int k = int.Parse(Environment.GetEnvironmentVariable("TASKPHRASE_CLINC_K") ?? "10", CultureInfo.InvariantCulture);
        var registry = ClincRegistry.Build(k);
        var generator = ClincEmbeddings.Generator(fixture);
        var tasks = registry.Tasks;
        var labels = tasks.SelectMany((t, i) => t.Phrases.Select(_ => i)).ToArray();
        var phraseVectors = generator.GenerateAsync(tasks.SelectMany(t => t.Phrases).ToList()).GetAwaiter().GetResult();
        int d = phraseVectors[0].Vector.Length;
        var flat = phraseVectors.SelectMany(e => e.Vector.ToArray()).ToArray();
        var (halfA, halfB) = ClincJointSearchMeasurement.Halves();
        var taskIndex = tasks.Select((t, i) => (t.Id, i)).ToDictionary(x => x.Id, x => x.i);

        var counts = tasks.Select(t =>
        {
            var c = new Dictionary<string, double>(StringComparer.Ordinal);
            foreach (var p in t.Phrases) foreach (var s in Stems(p)) c[s] = c.GetValueOrDefault(s) + 1;
            return c;
        }).ToArray();
        var df = new Dictionary<string, int>(StringComparer.Ordinal);
        foreach (var c in counts) foreach (var s in c.Keys) df[s] = df.GetValueOrDefault(s) + 1;
        double Idf(string s) => Math.Log((double)tasks.Count / df[s]);
        var taskVectors = counts.Select(c =>
        {
            var v = c.ToDictionary(kv => kv.Key, kv => Math.Sqrt(kv.Value) * Idf(kv.Key), StringComparer.Ordinal);
            double n = Math.Sqrt(v.Values.Sum(x => x * x));
            return v.ToDictionary(kv => kv.Key, kv => n > 0 ? kv.Value / n : 0, StringComparer.Ordinal);
        }).ToArray();

        foreach (var (l2, alpha) in new[] { (0.01, 0.25), (0.01, 1.0), (0.001, 0.5) })
        {
            var head = TaskHead.Train(flat, labels, tasks.Count, [], d, new LearnedScoringOptions { L2 = l2, ProbabilityWeight = alpha });
            foreach (var (name, half) in new[] { ("A", halfA), ("B", halfB) })
            {
                var set = half.Where(p => p.IsInScope).ToList();
                var queryVectors = generator.GenerateAsync(set.Select(p => p.Utterance).ToList()).GetAwaiter().GetResult();
                var scores = new float[tasks.Count];
                var headScores = new double[set.Count][];
                var lexical = new double[set.Count][];
                for (int q = 0; q < set.Count; q++)
                {
                    head.ScoreTasks(queryVectors[q].Vector.Span, scores, out _);
                    headScores[q] = scores.Select(x => (double)x).ToArray();
                    var stems = Stems(set[q].Utterance).Where(df.ContainsKey).ToList();
                    double norm = Math.Sqrt(stems.Sum(s => Idf(s) * Idf(s)));
                    lexical[q] = taskVectors.Select(tv => norm == 0 ? 0 : stems.Sum(s => tv.GetValueOrDefault(s) * Idf(s)) / norm).ToArray();
                }
                var truth = set.Select(p => taskIndex[p.Expect]).ToArray();
                foreach (double beta in new[] { 0, 0.05, 0.1, 0.2, 0.3 })
                {
                    var top = new (int Task, double Score, double Margin)[set.Count];
                    for (int q = 0; q < set.Count; q++)
                    {
                        int best = -1;
                        double s1 = double.NegativeInfinity, s2 = double.NegativeInfinity;
                        for (int t = 0; t < tasks.Count; t++)
                        {
                            double s = headScores[q][t] + beta * lexical[q][t];
                            if (s > s1) { s2 = s1; s1 = s; best = t; }
                            else if (s > s2) s2 = s;
                        }
                        top[q] = (best, s1, s1 - s2);
                    }
                    double closed = top.Where((x, q) => x.Task == truth[q]).Count() / (double)set.Count;
                    Assert.InRange(closed, 0.5, 1.0);
                    string Ceiling(Func<(int Task, double Score, double Margin), double> confidence)
                    {
                        int right = 0, wrong = 0, best = 0;
                        foreach (int q in Enumerable.Range(0, set.Count).OrderByDescending(q => confidence(top[q])))
                        {
                            if (top[q].Task == truth[q]) right++;
                            else wrong++;
                            if (wrong <= 0.05 * set.Count) best = Math.Max(best, right);
                        }
                        return (100.0 * best / set.Count).ToString("0.0", CultureInfo.InvariantCulture);
                    }
                    output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                        $"k={k} head L2 {l2} α {alpha} half {name} β {beta}: closed-set {100 * closed:0.0} %; ceiling at 5 % wrong: score {Ceiling(x => x.Score)} %, margin {Ceiling(x => x.Margin)} %, sum {Ceiling(x => x.Score + x.Margin)} %"));
                }
            }
        }
    }
}
