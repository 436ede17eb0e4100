using System.Security.Cryptography;
using System.Text.Json;
using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Onnx.Quantization;

/// <summary>
/// The CLINC150 part of the int8 quality gate (Larson et al., 2019, "An Evaluation Dataset for Intent Classification
/// and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0): a registry from the first 10 training queries of each of the
/// 150 intents; the validation split (in-scope and out-of-scope) resolved by each model with the default scoring;
/// accept and margin tuned on the fp32 model's even rows (budgets: wrong task 10 %, false accept 5 %; no per-task
/// overrides); both models audited on the odd rows at those thresholds.
/// </summary>
internal static class Clinc150Audit
{
    /// <summary>Registry phrases per intent.</summary>
    public const int PhrasesPerIntent = 10;

    /// <summary>Finds <c>clinc150_train_val.json</c>: the path itself, or inside it when it is a directory.</summary>
    /// <exception cref="FileNotFoundException">Neither exists.</exception>
    public static string Locate(string fileOrDirectory)
    {
        string path = Directory.Exists(fileOrDirectory) ? Path.Combine(fileOrDirectory, "clinc150_train_val.json") : fileOrDirectory;
        if (!File.Exists(path))
            throw new FileNotFoundException($"{path}: CLINC150 file not found. Give the clinc150_train_val.json file (splits train, val, oos_val) or its folder.", path);
        return path;
    }

    /// <summary>Runs the audit of both models.</summary>
    /// <exception cref="InvalidDataException">The file is not the expected JSON.</exception>
    public static Clinc150Figures Measure(string path, OnnxEmbedder fp32, OnnxEmbedder int8, CancellationToken cancellationToken)
    {
        byte[] bytes = File.ReadAllBytes(path);
        Dictionary<string, (string Text, string Intent)[]> splits;
        try
        {
            using var doc = JsonDocument.Parse(bytes);
            splits = new Dictionary<string, (string, string)[]>(StringComparer.Ordinal);
            foreach (var split in doc.RootElement.EnumerateObject())
                splits[split.Name] = split.Value.EnumerateArray().Select(r => (r[0].GetString()!, r[1].GetString()!)).ToArray();
        }
        catch (Exception e) when (e is JsonException or InvalidOperationException or IndexOutOfRangeException)
        {
            throw new InvalidDataException($"{path}: not CLINC150 JSON (an object of splits, each a list of [text, intent] pairs): {e.Message}", e);
        }
        foreach (var name in new[] { "train", "val", "oos_val" })
            if (!splits.ContainsKey(name)) throw new InvalidDataException($"{path}: CLINC150 split \"{name}\" is missing.");

        var registry = BuildRegistry(splits["train"]);
        var probes = splits["val"].Concat(splits["oos_val"])
            .Select(r => new ProbeCase(r.Text, r.Intent == "oos" ? ProbeCase.Reject : TaskIdOf(r.Intent))).ToList();
        var fp32Scored = Score(registry, probes, fp32, cancellationToken);
        var int8Scored = Score(registry, probes, int8, cancellationToken);
        var tuned = new ThresholdTuner(new TuningOptions { AllowOverrides = false })
            .TuneForBudgets(fp32Scored.Where((_, i) => i % 2 == 0).ToList(), new TuningBudgets(0.10, 0.05));
        var a = TuningMetrics.Evaluate(fp32Scored.Where((_, i) => i % 2 == 1), tuned.Rule);
        var b = TuningMetrics.Evaluate(int8Scored.Where((_, i) => i % 2 == 1), tuned.Rule);
        static double R(double x) => Math.Round(x, 6, MidpointRounding.ToEven);
        return new Clinc150Figures
        {
            DatasetSha256 = Convert.ToHexStringLower(SHA256.HashData(bytes)),
            Accept = R(tuned.Accept),
            Margin = R(tuned.Margin),
            InScope = a.InScope,
            OutOfScope = a.OutOfScope,
            Fp32 = new Clinc150Rates { InScopeAccuracy = R(a.InScopeAccuracy.Value), WrongTask = R(a.WrongTaskRate.Value), FalseAccept = R(a.FalseAcceptRate.Value) },
            Int8 = new Clinc150Rates { InScopeAccuracy = R(b.InScopeAccuracy.Value), WrongTask = R(b.WrongTaskRate.Value), FalseAccept = R(b.FalseAcceptRate.Value) },
        };
    }

    private static string TaskIdOf(string intent) => intent.Replace('_', '-');

    private static TaskRegistry BuildRegistry(IEnumerable<(string Text, string Intent)> train)
    {
        var seen = new HashSet<string>(StringComparer.Ordinal);
        var tasks = train.GroupBy(r => r.Intent)
            .Select(g => new TaskDefinition
            {
                Id = TaskIdOf(g.Key),
                Title = g.Key.Replace('_', ' '),
                Controller = new ControllerBinding("none", 1),
                Phrases = g.Select(r => r.Text).Where(t => seen.Add(TaskPhrase.Text.TextNormalizer.MatchKey(t))).Take(PhrasesPerIntent).ToArray(),
            })
            .ToArray();
        return new TaskRegistry(tasks, RegistryDefaults.Standard, $"clinc150-k{PhrasesPerIntent}");
    }

    private static List<ScoredProbe> Score(TaskRegistry registry, List<ProbeCase> probes, OnnxEmbedder embedder, CancellationToken cancellationToken)
    {
        var resolver = TaskResolver.Create(registry, embedder, new ResolverOptions { Scoring = ResolverOptions.DefaultScoring });
        var res = resolver.ResolveMany(probes.Select(p => p.Utterance).ToList(), cancellationToken);
        return probes.Select((p, i) => ScoredProbe.From(p, res[i])).ToList();
    }
}
