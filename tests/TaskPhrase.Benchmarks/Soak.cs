using System.Diagnostics;
using System.Globalization;
using TaskPhrase.Onnx;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>soak N [MODEL_EVERY]</c>: N resolves (default 1,000,000) on one resolver, one in MODEL_EVERY (default 20, so 5 %)
/// through the model and the rest exact matches. Every N/20 resolves it prints the managed heap after a full GC,
/// the working set and the private bytes. Fails (exit 1) when, from the end of the first interval (warm-up: ONNX
/// Runtime's arenas and the JIT settle there) to the end, the managed heap grows by more than 8 MiB or the private
/// bytes by more than 64 MiB.
/// </summary>
public static class Soak
{
    private const long MaxManagedGrowth = 8L << 20;
    private const long MaxPrivateGrowth = 64L << 20;

    public static int Run(string[] args)
    {
        long total = args.Length > 0 ? long.Parse(args[0], CultureInfo.InvariantCulture) : 1_000_000;
        int modelEvery = args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 20;
        using var embedder = OnnxEmbedder.CreateDefault();
        var resolver = TaskResolver.Create(SoakWorkload.Registry(), embedder);
        var expected = SoakWorkload.Exact.Concat(SoakWorkload.ModelPath).Distinct()
            .ToDictionary(u => u, u => SoakWorkload.Fingerprint(resolver.Resolve(u)), StringComparer.Ordinal);
        long interval = Math.Max(1, total / 20);
        var process = Process.GetCurrentProcess();
        var clock = Stopwatch.StartNew();
        (long Managed, long Private)? baseline = null;
        long maxManaged = 0, maxPrivate = 0, wrong = 0;
        Console.WriteLine($"soak: {total:N0} resolves, 1 in {modelEvery} through the model; bounds after warm-up: managed +{MaxManagedGrowth >> 20} MiB, private +{MaxPrivateGrowth >> 20} MiB");
        Console.WriteLine("resolves,seconds,resolves_per_s,managed_kib,working_set_kib,private_kib");
        for (long i = 1; i <= total; i++)
        {
            string u = SoakWorkload.Utterance(i, modelEvery);
            // Check a sample of results against the first answers (a full comparison would dominate the run).
            var r = resolver.Resolve(u);
            if (i % 97 == 0 && SoakWorkload.Fingerprint(r) != expected[u]) wrong++;
            if (i % interval != 0) continue;
            long managed = GC.GetTotalMemory(forceFullCollection: true);
            process.Refresh();
            long workingSet = process.WorkingSet64, privateBytes = process.PrivateMemorySize64;
            double seconds = clock.Elapsed.TotalSeconds;
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{i},{seconds:0.0},{i / seconds:0},{managed / 1024},{workingSet / 1024},{privateBytes / 1024}"));
            baseline ??= (managed, privateBytes);
            maxManaged = Math.Max(maxManaged, managed);
            maxPrivate = Math.Max(maxPrivate, privateBytes);
        }
        if (baseline is not { } b)
        {
            Console.WriteLine("soak: too few resolves for one interval.");
            return 2;
        }
        long managedGrowth = maxManaged - b.Managed, privateGrowth = maxPrivate - b.Private;
        bool ok = managedGrowth <= MaxManagedGrowth && privateGrowth <= MaxPrivateGrowth && wrong == 0;
        Console.WriteLine($"soak: {(ok ? "passed" : "FAILED")}: managed heap peak {managedGrowth / 1024:N0} KiB over the post-warm-up baseline (bound {MaxManagedGrowth >> 10:N0}), private bytes peak {privateGrowth / 1024:N0} KiB over it (bound {MaxPrivateGrowth >> 10:N0}), {wrong} sampled results differed from the first answers, {clock.Elapsed.TotalSeconds:0} s");
        return ok ? 0 : 1;
    }
}
