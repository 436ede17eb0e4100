using System.Diagnostics;
using System.Globalization;
using Microsoft.ML.OnnxRuntime;
using TaskPhrase.Onnx;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>startup</c>: where a cold <c>resolve --index</c> spends its time and memory, phase by phase, in this (fresh)
/// process: the embedder (session creation and model hash), the index, the resolver, the first resolve. Prints one
/// line with the wall time of each phase and the peak resident memory (VmHWM). Run it as a new process each time.
/// <c>--session-only</c> times a bare <see cref="InferenceSession"/> instead, with <c>--level basic|extended|all</c>
/// and <c>--no-prepack</c> (session.disable_prepacking), to see what the session options cost.
/// </summary>
internal static class StartupPhases
{
    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "session-only", "level", "no-prepack", "index", "save-ort", "ort", "bytes", "profile", "tokenizer", "config", "no-arena", "memory", "save-onnx", "externalize", "runs", "source", "plain");
        var total = Stopwatch.StartNew();
        var phases = new List<(string, double)>();
        var memory = new List<string>();
        void Mark(string name, Stopwatch sw)
        {
            phases.Add((name, sw.Elapsed.TotalMilliseconds));
            memory.Add($"{name}: rss {Status("VmRSS")} hwm {Status("VmHWM")} managed {GC.GetTotalMemory(false) >> 20} MiB allocated {GC.GetTotalAllocatedBytes() >> 20} MiB");
            sw.Restart();
        }
        var sw = Stopwatch.StartNew();
        if (a.Flag("externalize"))
        {
            // Writes model.onnx with every initializer of 1 KiB or more in a side file, each at a 4 KiB-aligned
            // offset (so ONNX Runtime can map it into memory), then exits.
            string target = a.Text("externalize", "");
            var model = global::Onnx.ModelProto.Parser.ParseFrom(File.ReadAllBytes(a.Text("source", Path.Combine(BenchmarkPaths.ModelDirectory, "model.onnx"))));
            string dataName = Path.GetFileName(target) + ".data";
            using var data = File.Create(Path.Combine(Path.GetDirectoryName(Path.GetFullPath(target))!, dataName));
            foreach (var t in model.Graph.Initializer)
            {
                if (t.RawData.Length < 1024) continue;
                long offset = (data.Position + 4095) / 4096 * 4096;
                data.Position = offset;
                t.RawData.WriteTo(data);
                long length = t.RawData.Length;
                t.RawData = Google.Protobuf.ByteString.Empty;
                t.DataLocation = global::Onnx.TensorProto.Types.DataLocation.External;
                t.ExternalData.Add(new global::Onnx.StringStringEntryProto { Key = "location", Value = dataName });
                t.ExternalData.Add(new global::Onnx.StringStringEntryProto { Key = "offset", Value = offset.ToString(CultureInfo.InvariantCulture) });
                t.ExternalData.Add(new global::Onnx.StringStringEntryProto { Key = "length", Value = length.ToString(CultureInfo.InvariantCulture) });
            }
            File.WriteAllBytes(target, Google.Protobuf.MessageExtensions.ToByteArray(model));
            Console.WriteLine($"wrote {target} and {dataName} ({data.Length >> 20} MiB)");
            return;
        }
        if (a.Flag("session-only"))
        {
            using var options = new SessionOptions
            {
                GraphOptimizationLevel = a.Text("level", "all") switch
                {
                    "basic" => GraphOptimizationLevel.ORT_ENABLE_BASIC,
                    "extended" => GraphOptimizationLevel.ORT_ENABLE_EXTENDED,
                    "all" => GraphOptimizationLevel.ORT_ENABLE_ALL,
                    var other => throw new ArgumentException($"--level is basic, extended or all, not '{other}'."),
                },
                ExecutionMode = ExecutionMode.ORT_SEQUENTIAL,
                IntraOpNumThreads = 2,
                InterOpNumThreads = 1,
            };
            options.AddSessionConfigEntry("session.intra_op.allow_spinning", "0");
            if (a.Flag("profile")) { options.EnableProfiling = true; options.ProfileOutputPathPrefix = Path.Combine(BenchmarkPaths.Scratch, "ort-profile"); }
            if (a.Flag("config")) foreach (var kv in a.Text("config", "").Split(',')) options.AddSessionConfigEntry(kv.Split('=')[0], kv.Split('=')[1]);
            if (a.Flag("no-arena")) options.EnableCpuMemArena = false;
            if (a.Flag("no-prepack")) options.AddSessionConfigEntry("session.disable_prepacking", "1");
            if (a.Flag("save-ort"))
            {
                options.AddSessionConfigEntry("session.save_model_format", "ORT");
                options.OptimizedModelFilePath = a.Text("save-ort", "");
            }
            if (a.Flag("save-onnx"))
            {
                // The optimised graph in ONNX format with its initializers in a side file (which ONNX Runtime maps
                // into memory when the result is loaded).
                options.OptimizedModelFilePath = a.Text("save-onnx", "");
                options.AddSessionConfigEntry("session.optimized_model_external_initializers_file_name", Path.GetFileName(a.Text("save-onnx", "")) + ".data");
                options.AddSessionConfigEntry("session.optimized_model_external_initializers_min_size_in_bytes", "1024");
            }
            string model = a.Flag("ort") ? a.Text("ort", "") : Path.Combine(BenchmarkPaths.ModelDirectory, "model.onnx");
            byte[]? bytes = null;
            if (a.Flag("bytes"))
            {
                bytes = File.ReadAllBytes(model);
                options.AddSessionConfigEntry("session.use_ort_model_bytes_directly", "1");
                options.AddSessionConfigEntry("session.use_ort_model_bytes_for_initializers", "1");
            }
            using var session = bytes is null ? new InferenceSession(model, options) : new InferenceSession(bytes, options);
            Mark("session", sw);
            using var embedderFree = new RawForward(session, [101, 2300, 2003, 1037, 3231, 102]);
            embedderFree.Run();
            Mark("first run", sw);
            for (int i = 0; i < 20; i++) embedderFree.Run();
            Mark("20 runs", sw);
            if (a.Flag("runs"))
            {
                // Steady state: the median of N more single runs.
                var times = new double[Math.Max(1, a.Int("runs", 200))];
                for (int i = 0; i < times.Length; i++) { var t = Stopwatch.StartNew(); embedderFree.Run(); times[i] = t.Elapsed.TotalMilliseconds; }
                Array.Sort(times);
                Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"median of {times.Length} runs {times[times.Length / 2]:0.000} ms"));
                sw.Restart();
            }
        }
        else
        {
            string index = a.Text("index", Path.Combine(BenchmarkPaths.Scratch, "coldstart-1000.tpx"));
            if (a.Flag("tokenizer"))
            {
                _ = new WordPieceTokenizer(Path.Combine(BenchmarkPaths.ModelDirectory, "vocab.txt"), lowercase: true);
                Mark("tokenizer alone", sw);
            }
            // --plain: from model.onnx even where the mapped form is there.
            using var embedder = OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory, new OnnxEmbedderOptions { UseOptimizedModel = !a.Flag("plain") });
            Mark("embedder", sw);
            var taskIndex = TaskIndex.Load(index, embedder.Model);
            Mark("index", sw);
            var resolver = TaskResolver.FromIndex(taskIndex, embedder);
            Mark("resolver", sw);
            var r = resolver.ResolveMany(["could you bring me the kettle from the kitchen"]);
            Mark("first resolve", sw);
            GC.KeepAlive(r);
        }
        phases.Add(("total", total.Elapsed.TotalMilliseconds));
        Console.WriteLine(string.Join("  ", phases.Select(p => string.Create(CultureInfo.InvariantCulture, $"{p.Item1} {p.Item2:0} ms"))) + $"  peak {Status("VmHWM")}");
        if (a.Flag("memory")) foreach (var m in memory) Console.WriteLine("  " + m);
    }

    private static string Status(string key)
        => File.ReadLines("/proc/self/status").FirstOrDefault(l => l.StartsWith(key, StringComparison.Ordinal))?.Split(':')[1].Trim() ?? "?";
}
