using System.Globalization;
using System.Text.Json;
using Microsoft.ML.OnnxRuntime;
using TaskPhrase.Onnx;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>op-profile [--int8 DIR] [--threads N] [--batch N] [--single]</c>: where a model's forward time goes. Runs the
/// embedder's own session settings with ONNX Runtime's profiler on (the 1,000 phrases of the synthetic build registry,
/// or with <c>--single</c> the 12-token benchmark command 200 times), then sums the profiler's node events by operator
/// type, for fp32 and the int8 model side by side. Profiling adds overhead per node, so read the shares, not the totals.
/// </summary>
internal static class OpProfile
{
    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "int8", "threads", "batch", "single");
        int threads = a.Int("threads", 1);
        bool single = a.Flag("single");
        var texts = single
            ? Enumerable.Repeat(ModelSetup.Command, 200).ToList()
            : SyntheticRegistry.Load(100, 10).Tasks.SelectMany(t => t.Phrases).ToList();
        foreach (var (name, dir) in new[] { ("fp32", BenchmarkPaths.ModelDirectory), ("int8", Int8Models.Directory(a.Text("int8", ""))) })
        {
            string prefix = Path.Combine(BenchmarkPaths.Scratch, $"op-profile-{name}-{Environment.ProcessId}");
            var options = new OnnxEmbedderOptions
            {
                IntraOpThreads = threads, QuantizedIntraOpThreads = threads, UseOptimizedModel = false,
                ConfigureSession = o => { o.EnableProfiling = true; o.ProfileOutputPathPrefix = prefix; },
            };
            if (a.Flag("batch")) { options.BatchSize = a.Int("batch", 32); options.QuantizedBatchSize = a.Int("batch", 128); }
            string file;
            using (var embedder = OnnxEmbedder.Create(dir, options))
            {
                if (single) { var v = new float[embedder.Model.Dimensions]; foreach (var t in texts) embedder.Embed(t, v); }
                else embedder.EmbedMany(texts);
                file = embedder.Session.EndProfiling();
            }
            var byOp = new Dictionary<string, double>();
            var nodes = new Dictionary<string, HashSet<string>>();
            using (var json = JsonDocument.Parse(File.ReadAllText(file)))
            {
                foreach (var e in json.RootElement.EnumerateArray())
                {
                    if (e.GetProperty("cat").GetString() != "Node" || !e.TryGetProperty("args", out var args2) || !args2.TryGetProperty("op_name", out var op)) continue;
                    string key = op.GetString() ?? "?";
                    byOp[key] = byOp.GetValueOrDefault(key) + e.GetProperty("dur").GetDouble();
                    if (!nodes.TryGetValue(key, out var names)) nodes[key] = names = new HashSet<string>(StringComparer.Ordinal);
                    names.Add(e.GetProperty("name").GetString() ?? "?");
                }
            }
            File.Delete(file);
            double total = byOp.Values.Sum();
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{name} ({dir}), {threads} thread(s), {(single ? "200 single commands" : "1,000 phrases batched")}: node time {total / 1000:0.0} ms, {nodes.Values.Sum(n => n.Count)} nodes"));
            Console.WriteLine("| operator | nodes | ms | share |");
            Console.WriteLine("| --- | ---: | ---: | ---: |");
            foreach (var (op, us) in byOp.OrderByDescending(kv => kv.Value))
                Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"| {op} | {nodes[op].Count} | {us / 1000:0.0} | {us / total:P1} |"));
            Console.WriteLine();
        }
    }
}
