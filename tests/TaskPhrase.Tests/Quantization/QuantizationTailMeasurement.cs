using System.Globalization;
using System.Numerics.Tensors;
using System.Text;
using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;
using TaskPhrase.Tests.Resolution.Scoring;
using Xunit.Abstractions;
using GroupPlan = TaskPhrase.Onnx.Quantization.ModelQuantizer.GroupPlan;
using MatMulGroup = TaskPhrase.Onnx.Quantization.ModelQuantizer.MatMulGroup;

namespace TaskPhrase.Tests.Quantization;

/// <summary>
/// The int8 cosine tail on 3,000 CLINC150 training queries (Larson et al., 2019, "An Evaluation Dataset for Intent
/// Classification and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0; every fifth row of the train split), for
/// variants of the quantiser's per-group plan (docs/int8.md, "The tail on CLINC150 training queries"). Each variant is
/// quantised with <see cref="ModelQuantizer"/> (its own gates apply; a variant that fails them is reported, not
/// measured) and its embeddings, made one at a time and in batches, are compared with fp32's.
/// <para>Variants from <c>TASKPHRASE_Q8_VARIANTS</c> (space-separated; default <c>base</c>). A variant is
/// <c>base</c> or clauses joined by <c>+</c>, each <c>ACTION:SELECTORS</c> with comma-separated selectors
/// <c>L{layer}.{role}</c>, <c>*.{role}</c>, <c>L{layer}.*</c> or <c>*</c> (roles in graph order per layer:
/// <c>qkv</c>, <c>attn-out</c>, <c>ffn-in</c>, <c>ffn-out</c>); actions: <c>fp32</c> (leave in fp32), <c>only</c>
/// (leave every other group in fp32), <c>token</c> / <c>tensor</c> (per-token / per-tensor activation scales),
/// <c>a0.5</c> (smoothing α 0.5), <c>keep8</c> (the 8 input channels with the largest smoothed weight rows in fp32), <c>simw</c> / <c>simx</c> (only the weights / only the activations quantised, the
/// product in fp32: which side's error matters), and <c>calib:wide</c> (calibrate on the calibration and the held-out phrases; a
/// measurement of the calibration set's breadth, the held-out figure is then not held out).
/// <c>TASKPHRASE_Q8_DETAIL=0.99</c> lists every query whose single or batched cosine is below that, with its tokens; <c>TASKPHRASE_Q8_CLINC=1</c> adds the
/// CLINC150 audit gate; <c>TASKPHRASE_Q8_KEEP=DIR</c> keeps each model in DIR/variant (for <c>int8-paired</c>); lines
/// are appended to <c>TASKPHRASE_MEASURE_LOG</c> when set.</para>
/// </summary>
[Trait("tier", "slow")]
public sealed class QuantizationTailMeasurement(ITestOutputHelper output)
{
    private static readonly string[] Roles = ["qkv", "attn-out", "ffn-in", "ffn-out"];

    /// <summary>Every fifth CLINC150 training query (3,000).</summary>
    internal static IReadOnlyList<string> TrainQueries() => Clinc150.Split("train").Where((_, i) => i % 5 == 0).Select(r => r.Text).ToList();

    private void Log(string line)
    {
        output.WriteLine(line);
        if (Environment.GetEnvironmentVariable("TASKPHRASE_MEASURE_LOG") is { Length: > 0 } log) File.AppendAllText(log, line + "\n");
    }

    [MeasurementFact]
    public void Int8_TrainQueries_CosineTailPerVariant()
    {
        var queries = TrainQueries();
        using var fp32 = OnnxEmbedder.CreateDefault();
        var (reference, _) = fp32.EmbedMany(queries);
        var variants = (Environment.GetEnvironmentVariable("TASKPHRASE_Q8_VARIANTS") is { Length: > 0 } v ? v : "base")
            .Split(' ', StringSplitOptions.RemoveEmptyEntries);
        double detail = double.TryParse(Environment.GetEnvironmentVariable("TASKPHRASE_Q8_DETAIL"), CultureInfo.InvariantCulture, out var d) ? d : 0;
        bool clinc = Environment.GetEnvironmentVariable("TASKPHRASE_Q8_CLINC") == "1";
        string? keep = Environment.GetEnvironmentVariable("TASKPHRASE_Q8_KEEP") is { Length: > 0 } k ? k : null;
        Log($"# {DateTime.UtcNow:yyyy-MM-dd HH:mm} UTC, load {LoadAverage()}, {queries.Count} CLINC150 train queries");
        foreach (var variant in variants)
        {
            string dir = keep is not null ? Path.Combine(keep, Sanitise(variant)) : Directory.CreateTempSubdirectory("taskphrase-q8tail-").FullName;
            try
            {
                var options = Options(variant, clinc);
                var result = ModelQuantizer.Quantize(BuiltInModels.MiniLmL6V2, dir, options);
                var q = result.Quantization.Quality!;
                string gates = string.Create(CultureInfo.InvariantCulture,
                    $"held-out min {q.SingleMinCosine:0.0000}/{q.BatchedMinCosine:0.0000} mean {q.MeanCosine:0.0000}; Quickstart {string.Join(" / ", q.SimilarityMatrix!.Select(x => x.ToString("0.0000", CultureInfo.InvariantCulture)))}");
                if (q.Clinc150 is { Int8: { } c8, Fp32: { } c32 })
                    gates += string.Create(CultureInfo.InvariantCulture, $"; CLINC audit {c8.InScopeAccuracy:P2} / {c8.WrongTask:P2} / {c8.FalseAccept:P1} (fp32 {c32.InScopeAccuracy:P2} / {c32.WrongTask:P2} / {c32.FalseAccept:P1})");
                if (!result.Passed)
                {
                    Log($"{variant}: FAILED its gates ({result.Failure}); {gates}");
                    continue;
                }
                using var int8 = OnnxEmbedder.Create(dir);
                var (batched, _) = int8.EmbedMany(queries);
                var single = new double[queries.Count];
                var many = new double[queries.Count];
                var vector = new float[int8.Model.Dimensions];
                for (int i = 0; i < queries.Count; i++)
                {
                    int8.Embed(queries[i], vector);
                    single[i] = TensorPrimitives.CosineSimilarity(reference[i], vector);
                    many[i] = TensorPrimitives.CosineSimilarity(reference[i], batched[i]);
                }
                Log(string.Create(CultureInfo.InvariantCulture,
                    $"{variant}: single min {single.Min():0.0000} mean {single.Average():0.00000} below {single.Count(x => x < QuantizationGates.MinCosine)}; batched min {many.Min():0.0000} mean {many.Average():0.00000} below {many.Count(x => x < QuantizationGates.MinCosine)}; matmuls {result.Quantization.QuantizedMatMuls}; {gates}"));
                if (detail > 0)
                {
                    var ids = new long[int8.Model.MaxTokens];
                    var mask = new long[int8.Model.MaxTokens];
                    foreach (int i in Enumerable.Range(0, queries.Count).Where(i => Math.Min(single[i], many[i]) < detail).OrderBy(i => Math.Min(single[i], many[i])))
                    {
                        int count = int8.Tokenizer.Encode(queries[i], ids, mask).Count;
                        string tokens = string.Join(' ', ids.Take(count).Select(id => int8.Tokenizer.TokenOf(id)));
                        Log(string.Create(CultureInfo.InvariantCulture, $"  {single[i]:0.0000} / {many[i]:0.0000}  {count,2} tokens  {tokens}"));
                    }
                }
            }
            finally
            {
                if (keep is null && Directory.Exists(dir)) Directory.Delete(dir, recursive: true);
            }
        }
    }

    private static string Sanitise(string variant) => new(variant.Select(c => char.IsLetterOrDigit(c) || c is '-' or '.' ? c : '_').ToArray());

    internal static string LoadAverage() =>
        File.Exists("/proc/loadavg") ? string.Join(' ', File.ReadAllText("/proc/loadavg").Split(' ').Take(3)) : "unknown";

    /// <summary>Quantiser options of a variant (see the class summary).</summary>
    internal static QuantizationOptions Options(string variant, bool clinc)
    {
        var clauses = variant == "base" ? [] : variant.Split('+');
        IReadOnlyList<string>? calibration = null;
        var actions = new List<(string Action, Func<int, bool> Selected)>();
        foreach (var clause in clauses)
        {
            if (clause == "calib:wide") { calibration = [.. QuantizationPhrases.Calibration, .. QuantizationPhrases.HeldOut]; continue; }
            int colon = clause.IndexOf(':');
            if (colon < 0) throw new ArgumentException($"variant clause '{clause}' is not ACTION:SELECTORS");
            var selectors = clause[(colon + 1)..].Split(',').Select(Selector).ToList();
            actions.Add((clause[..colon], i => selectors.Any(s => s(i))));
        }
        GroupPlan Plan(IReadOnlyList<MatMulGroup> groups, int index)
        {
            if (groups.Count != 24 || groups[3].Channels != 1536)
                throw new InvalidOperationException($"expected 6 layers of 4 groups with the 1,536-wide input fourth, found {groups.Count} groups");
            var plan = ModelQuantizer.DefaultPlan(groups, index);
            foreach (var (action, selected) in actions)
            {
                bool hit = selected(index);
                plan = action switch
                {
                    "fp32" => hit ? plan with { Quantize = false } : plan,
                    "only" => hit ? plan : plan with { Quantize = false },
                    "token" => hit ? plan with { PerToken = true } : plan,
                    "tensor" => hit ? plan with { PerToken = false } : plan,
                    "simw" => hit ? plan with { Simulate = ModelQuantizer.SimulatedError.WeightsOnly } : plan,
                    "simx" => hit ? plan with { Simulate = ModelQuantizer.SimulatedError.ActivationsOnly } : plan,
                    _ when action.StartsWith("keep", StringComparison.Ordinal) && int.TryParse(action[4..], CultureInfo.InvariantCulture, out var m) => hit ? plan with { Fp32Channels = m } : plan,
                    _ when action.StartsWith('a') && double.TryParse(action[1..], CultureInfo.InvariantCulture, out var a) => hit ? plan with { Alpha = a } : plan,
                    _ => throw new ArgumentException($"unknown variant action '{action}'"),
                };
            }
            return plan;
        }
        return new QuantizationOptions
        {
            Variant = clauses.Length == 0 ? null : (variant, Plan),
            CalibrationPhrases = calibration,
            Clinc150Path = clinc ? TestPaths.Clinc150 : null,
        };
    }

    private static Func<int, bool> Selector(string s)
    {
        if (s == "*") return _ => true;
        var parts = s.Split('.');
        if (parts.Length != 2) throw new ArgumentException($"selector '{s}' is not L{{layer}}.{{role}}");
        int? layer = parts[0] == "*" ? null : int.Parse(parts[0].TrimStart('L'), CultureInfo.InvariantCulture);
        int? role = parts[1] == "*" ? null : Array.IndexOf(Roles, parts[1]) is var r and >= 0 ? r : throw new ArgumentException($"unknown role '{parts[1]}'");
        return i => (layer is null || i / 4 == layer) && (role is null || i % 4 == role);
    }
}
