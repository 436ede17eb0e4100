using System.Diagnostics;
using System.Globalization;
using TaskPhrase.Onnx;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>sweep</c>: the measurements behind the embedder's defaults.
/// <c>--part threads</c>: the bare forward pass of the 12-token command for every intra-op thread count in
/// <c>--threads</c> (default 1,2), spinning off and on, and every competing-load level in <c>--load</c> (default 0,2 busy threads).
/// <c>--part batch</c>: <see cref="OnnxEmbedder.EmbedMany"/> of the 1,000 synthetic phrases for every batch size in
/// <c>--batch</c> (default 1,8,16,32,64,128), <c>--repeats</c> rounds in rotating order; phrases per second.
/// Without <c>--part</c> both run.
/// </summary>
internal static class SettingsSweep
{
    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "part", "threads", "load", "batch", "repeats", "rounds");
        string part = a.Text("part", "");
        if (part is not ("" or "threads" or "batch")) throw new ArgumentException($"--part is threads or batch, not '{part}'.");
        if (part is "" or "threads") Threads(a.Ints("threads", 1, 2), a.Ints("load", 0, 2), Math.Max(20, a.Int("rounds", 300)));
        if (part is "" or "batch") Batches(a.Ints("batch", 1, 8, 16, 32, 64, 128), Math.Max(1, a.Int("repeats", 3)));
    }

    private static void Threads(IReadOnlyList<int> threadCounts, IReadOnlyList<int> loads, int rounds)
    {
        string model = Path.Combine(BenchmarkPaths.ModelDirectory, "model.onnx");
        var tokenizer = new WordPieceTokenizer(Path.Combine(BenchmarkPaths.ModelDirectory, "vocab.txt"), lowercase: true);
        var ids = new long[256];
        var (count, _) = tokenizer.Encode(ModelSetup.Command, ids, new long[256]);
        Console.WriteLine($"sweep threads: bare forward pass of \"{ModelSetup.Command}\" ({count} tokens), {rounds} runs per setting after 50 warm-up runs");
        Console.WriteLine();
        Console.WriteLine("| intra-op threads | spinning | competing busy threads | median | p99 | p99 / median |");
        Console.WriteLine("| ---: | --- | ---: | ---: | ---: | ---: |");
        foreach (int load in loads)
        {
            foreach (int threads in threadCounts)
            {
                foreach (bool spin in new[] { false, true })
                {
                    using var raw = new RawForward(model, ids.AsSpan(0, count), threads, spin);
                    for (int i = 0; i < 50; i++) raw.Run();
                    var s = new Samples("raw", rounds);
                    using (load > 0 ? new CompetingLoad(load) : null)
                    {
                        for (int i = 0; i < rounds; i++) s.Time(() => raw.Run());
                    }
                    Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                        $"| {threads} | {(spin ? "on" : "off")} | {load} | {Samples.Us(s.Median)} | {Samples.Us(s.Percentile(99))} | {s.Percentile(99) / s.Median:0.00} |"));
                }
            }
        }
        Console.WriteLine();
    }

    private static void Batches(IReadOnlyList<int> sizes, int repeats)
    {
        var phrases = SyntheticRegistry.Load(100, 10).Tasks.SelectMany(t => t.Phrases).ToArray();
        var embedders = sizes.Select(b => OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory, new OnnxEmbedderOptions { BatchSize = b })).ToArray();
        try
        {
            var perSecond = sizes.Select(_ => new List<double>()).ToArray();
            foreach (var e in embedders) e.EmbedMany(phrases.Take(64).ToArray());
            for (int r = 0; r < repeats; r++)
            {
                for (int k = 0; k < sizes.Count; k++)
                {
                    int i = (k + r) % sizes.Count;
                    long start = Stopwatch.GetTimestamp();
                    embedders[i].EmbedMany(phrases);
                    perSecond[i].Add(phrases.Length / Stopwatch.GetElapsedTime(start).TotalSeconds);
                }
            }
            Console.WriteLine($"sweep batch: EmbedMany of {phrases.Length} synthetic phrases (sorted by length, then batched), intra-op threads 2, spinning off, {repeats} rounds in rotating order");
            Console.WriteLine();
            Console.WriteLine("| batch size | phrases/s (median) | best | worst |");
            Console.WriteLine("| ---: | ---: | ---: | ---: |");
            for (int i = 0; i < sizes.Count; i++)
            {
                var v = perSecond[i].Order().ToArray();
                Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"| {sizes[i]} | {v[v.Length / 2]:0} | {v[^1]:0} | {v[0]:0} |"));
            }
            Console.WriteLine();
        }
        finally
        {
            foreach (var e in embedders) e.Dispose();
        }
    }
}
