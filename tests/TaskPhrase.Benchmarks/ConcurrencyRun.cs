using System.Collections.Concurrent;
using System.Diagnostics;
using System.Globalization;
using TaskPhrase.Onnx;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>concurrency THREADS PER_THREAD [MODEL_EVERY]</c> (defaults 16, 10,000, 50): every thread resolves its share of the
/// soak mix (one in MODEL_EVERY through the model, the rest exact matches) on one shared resolver and compares every
/// result with the sequential answer. Exit 1 on any difference. The test suite runs a 16 × 2,000 version.
/// </summary>
public static class ConcurrencyRun
{
    public static int Run(string[] args)
    {
        int threads = args.Length > 0 ? int.Parse(args[0], CultureInfo.InvariantCulture) : 16;
        int perThread = args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 10_000;
        int modelEvery = args.Length > 2 ? int.Parse(args[2], CultureInfo.InvariantCulture) : 50;
        using var embedder = OnnxEmbedder.CreateDefault();
        var resolver = TaskResolver.Create(SoakWorkload.Registry(), embedder);
        var expected = SoakWorkload.Exact.Concat(SoakWorkload.ModelPath).Distinct()
            .ToDictionary(u => u, u => SoakWorkload.Fingerprint(resolver.Resolve(u)), StringComparer.Ordinal);
        var mismatches = new ConcurrentQueue<string>();
        long modelCalls = 0;
        using var start = new Barrier(threads + 1);
        var workers = Enumerable.Range(0, threads).Select(t => new Thread(() =>
        {
            start.SignalAndWait();
            for (int i = 0; i < perThread; i++)
            {
                string u = SoakWorkload.Utterance((long)t * perThread + i, modelEvery);
                var r = resolver.Resolve(u);
                if (!r.ExactMatch) Interlocked.Increment(ref modelCalls);
                if (SoakWorkload.Fingerprint(r) != expected[u]) mismatches.Enqueue($"thread {t}, call {i}: \"{u}\"");
            }
        })).ToList();
        workers.ForEach(w => w.Start());
        start.SignalAndWait();
        var clock = Stopwatch.StartNew();
        workers.ForEach(w => w.Join());
        long all = (long)threads * perThread;
        Console.WriteLine($"concurrency: {threads} threads × {perThread:N0} = {all:N0} resolves ({modelCalls:N0} through the model) in {clock.Elapsed.TotalSeconds:0.0} s, {all / clock.Elapsed.TotalSeconds:N0}/s; {mismatches.Count} differed from the sequential results");
        foreach (var m in mismatches.Take(10)) Console.WriteLine($"  {m}");
        return mismatches.IsEmpty ? 0 : 1;
    }
}
