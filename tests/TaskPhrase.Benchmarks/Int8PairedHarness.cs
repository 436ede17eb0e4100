using System.Globalization;
using TaskPhrase.Onnx;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>int8-paired</c>: the int8 model against fp32 in one process, interleaved in a fresh random order every round so
/// that whatever the other tenants of the machine do lands on both alike.
/// <list type="bullet">
/// <item>Single command: <see cref="TaskResolver.Resolve"/> of the 12-token <see cref="ModelSetup.Command"/> over the
/// Harbor Street registry, each variant at its best setting (fp32: <c>--fp32-threads</c>, default 2, spinning off;
/// int8: <c>--int8-threads</c>, default 1).</item>
/// <item>Batch build: <see cref="TaskIndexBuilder.BuildAsync"/> of a 1,000-phrase registry (100 tasks × 10), fp32 at 2
/// threads against int8 at its default 1 thread and at 2 threads.</item>
/// </list>
/// With <c>--baseline-int8 DIR</c> a second int8 model (e.g. one made by another method) joins both interleavings at
/// the same settings, and its speed-up over the first int8 model is reported too (<c>--int8</c> against it).
/// Reports median, p90, p99 per operation and each speed-up (fp32 median / int8 median) with a 95 % bootstrap
/// interval that resamples whole rounds, plus the load average before and after.
/// </summary>
internal static class Int8PairedHarness
{
    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "rounds", "warmup", "build-rounds", "fp32-threads", "int8-threads", "int8", "baseline-int8", "parallel");
        int rounds = Math.Max(10, a.Int("rounds", 1000)), warmup = a.Int("warmup", 100), buildRounds = Math.Max(3, a.Int("build-rounds", 8));
        int fp32Threads = a.Int("fp32-threads", 2), int8Threads = a.Int("int8-threads", 1);
        string int8Dir = Int8Models.Directory(a.Text("int8", ""));
        string baselineDir = a.Text("baseline-int8", "");
        string loadBefore = LoadAverage();

        var registry = RegistryLoader.Load(BenchmarkPaths.HarborRegistry);
        using var fp32 = OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory, new OnnxEmbedderOptions { IntraOpThreads = fp32Threads, AllowSpinning = false });
        using var int8 = OnnxEmbedder.Create(int8Dir, new OnnxEmbedderOptions { QuantizedIntraOpThreads = int8Threads, AllowSpinning = false });
        if (!int8.Model.Id.EndsWith("-int8", StringComparison.Ordinal)) throw new InvalidOperationException($"{int8Dir} holds {int8.Model.Id}, not an int8 model.");
        var fp32Resolver = TaskResolver.Create(registry, fp32);
        var int8Resolver = TaskResolver.Create(registry, int8);
        using var baseline = baselineDir.Length > 0 ? OnnxEmbedder.Create(baselineDir, new OnnxEmbedderOptions { QuantizedIntraOpThreads = int8Threads, AllowSpinning = false }) : null;
        var baselineResolver = baseline is null ? null : TaskResolver.Create(registry, baseline);
        var resolvers = new List<(string, TaskResolver)> { ("fp32", fp32Resolver), ("int8", int8Resolver) };
        if (baselineResolver is not null) resolvers.Add(("baseline int8", baselineResolver));
        foreach (var (name, r) in resolvers)
        {
            var check = r.Resolve(ModelSetup.Command);
            if (check.ExactMatch || check.Outcome != ResolutionOutcome.Accepted || check.Task?.Id != "water-basil")
                throw new InvalidOperationException($"{name}: \"{ModelSetup.Command}\" resolved {check.Outcome} ({check.Task?.Id}); the benchmark needs it accepted as water-basil through the model.");
        }

        // Single command.
        var single = new[] { new Samples($"resolve fp32 ({fp32Threads} threads)", rounds), new Samples($"resolve int8 ({int8Threads} thread{(int8Threads == 1 ? "" : "s")})", rounds) };
        Action[] singleOps = [() => fp32Resolver.Resolve(ModelSetup.Command), () => int8Resolver.Resolve(ModelSetup.Command)];
        if (baselineResolver is not null)
        {
            single = [.. single, new Samples($"resolve baseline int8 ({int8Threads} thread{(int8Threads == 1 ? "" : "s")})", rounds)];
            singleOps = [.. singleOps, () => baselineResolver.Resolve(ModelSetup.Command)];
        }
        for (int i = 0; i < warmup; i++) foreach (var op in singleOps) op();
        var random = new Random(11);
        Interleave(rounds, singleOps, single, random);

        // Batch build of 1,000 phrases.
        var big = SyntheticRegistry.Load(100, 10);
        using var fp32Build = OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory, new OnnxEmbedderOptions { IntraOpThreads = 2 });
        using var int8Build2 = OnnxEmbedder.Create(int8Dir, new OnnxEmbedderOptions { QuantizedIntraOpThreads = 2 });
        string path = Path.Combine(BenchmarkPaths.Scratch, $"int8-paired-{Environment.ProcessId}.tpidx");
        Func<OnnxEmbedder, Action> build = e => () => TaskIndexBuilder.BuildAsync(path, big, e).GetAwaiter().GetResult();
        Action[] buildOps = [build(fp32Build), build(int8), build(int8Build2)];
        var builds = new[] { new Samples("build 1,000 phrases fp32 (2 threads)", buildRounds), new Samples($"build 1,000 phrases int8 ({int8Threads} thread{(int8Threads == 1 ? "" : "s")}, default)", buildRounds), new Samples("build 1,000 phrases int8 (2 threads)", buildRounds) };
        if (baseline is not null)
        {
            builds = [.. builds, new Samples($"build 1,000 phrases baseline int8 ({int8Threads} thread{(int8Threads == 1 ? "" : "s")})", buildRounds)];
            buildOps = [.. buildOps, build(baseline)];
        }
        // --parallel W: both variants also at 1 intra-op thread with W batches side by side on the one session.
        int parallel = a.Int("parallel", 0), parallelAt = builds.Length;
        using var fp32Parallel = parallel > 1 ? OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory, new OnnxEmbedderOptions { IntraOpThreads = 1, ParallelBatches = parallel }) : null;
        using var int8Parallel = parallel > 1 ? OnnxEmbedder.Create(int8Dir, new OnnxEmbedderOptions { QuantizedIntraOpThreads = 1, ParallelBatches = parallel }) : null;
        if (fp32Parallel is not null && int8Parallel is not null)
        {
            builds = [.. builds, new Samples($"build 1,000 phrases fp32 (1 thread × {parallel} batches)", buildRounds), new Samples($"build 1,000 phrases int8 (1 thread × {parallel} batches)", buildRounds)];
            buildOps = [.. buildOps, build(fp32Parallel), build(int8Parallel)];
        }
        foreach (var op in buildOps) op();
        Interleave(buildRounds, buildOps, builds, random);
        File.Delete(path);

        Console.WriteLine($"int8-paired: {rounds} single-command rounds after {warmup} warm-up rounds, {buildRounds} build rounds after 1; random order each round");
        Console.WriteLine($"\"{ModelSetup.Command}\" over {BenchmarkPaths.HarborRegistry} ({registry.Tasks.Sum(t => t.Phrases.Count)} phrases); int8 model {int8Dir}");
        Console.WriteLine($"{Environment.ProcessorCount} logical CPUs, {System.Runtime.InteropServices.RuntimeInformation.ProcessArchitecture}, VNNI {(OnnxEmbedder.NeedsX64QuantPrecision ? "no (x64quantprecision set)" : "yes or not x64")}; load average before {loadBefore}, after {LoadAverage()}");
        Console.WriteLine();
        Console.WriteLine(Samples.Header);
        foreach (var s in single.Concat(builds)) Console.WriteLine(s.Row());
        Console.WriteLine();
        Report("single command, fp32 / int8", single[0], single[1], random, 1.8);
        Report($"batch build, fp32 (2 threads) / int8 ({int8Threads} thread{(int8Threads == 1 ? "" : "s")})", builds[0], builds[1], random, 2.2);
        Report("batch build, fp32 (2 threads) / int8 (2 threads)", builds[0], builds[2], random, 2.2);
        if (baseline is not null)
        {
            Console.WriteLine($"baseline int8 model {baselineDir}");
            Report("single command, baseline int8 / int8", single[2], single[1], random, 1.0);
            Report($"batch build, baseline int8 / int8 ({int8Threads} thread{(int8Threads == 1 ? "" : "s")})", builds[3], builds[1], random, 1.0);
        }
        if (parallel > 1)
        {
            var fp32Best = builds[0].Median <= builds[parallelAt].Median ? builds[0] : builds[parallelAt];
            Report($"batch build, fp32 at its best ({fp32Best.Name}) / int8 (1 thread × {parallel} batches)", fp32Best, builds[parallelAt + 1], random, 2.2);
            Report($"batch build, fp32 (2 threads) / fp32 (1 thread × {parallel} batches)", builds[0], builds[parallelAt], random, 1.0);
        }
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"phrases/s: fp32 {1000 / (builds[0].Median / 1e6):0}, int8 ({int8Threads}) {1000 / (builds[1].Median / 1e6):0}, int8 (2) {1000 / (builds[2].Median / 1e6):0}"));
    }

    private static void Interleave(int rounds, Action[] ops, Samples[] samples, Random random)
    {
        int[] order = Enumerable.Range(0, ops.Length).ToArray();
        for (int i = 0; i < rounds; i++)
        {
            random.Shuffle(order);
            foreach (int k in order) samples[k].Time(ops[k]);
        }
    }

    private static void Report(string name, Samples baseline, Samples candidate, Random random, double goal)
    {
        double ratio = baseline.Median / candidate.Median;
        var (lo, hi) = BootstrapSpeedUp(baseline, candidate, random);
        string verdict = lo >= goal ? "goal met" : hi < goal ? "goal missed" : "goal inside the interval";
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"{name}: speed-up {ratio:0.00}× (95 % bootstrap interval {lo:0.00}–{hi:0.00}; goal ≥ {goal}×: {verdict})"));
    }

    /// <summary>Bootstrap of the ratio of medians baseline / candidate, resampling whole rounds (pairs stay together).</summary>
    private static (double Low, double High) BootstrapSpeedUp(Samples baseline, Samples candidate, Random random)
    {
        const int resamples = 2000;
        int n = baseline.Count;
        var ratios = new double[resamples];
        var x = new double[n];
        var y = new double[n];
        for (int r = 0; r < resamples; r++)
        {
            for (int i = 0; i < n; i++)
            {
                int k = random.Next(n);
                x[i] = baseline.Values[k];
                y[i] = candidate.Values[k];
            }
            Array.Sort(x);
            Array.Sort(y);
            ratios[r] = Median(x) / Median(y);
        }
        Array.Sort(ratios);
        return (ratios[(int)(resamples * 0.025)], ratios[(int)Math.Ceiling(resamples * 0.975) - 1]);
    }

    private static double Median(double[] sorted) => sorted.Length % 2 == 1 ? sorted[sorted.Length / 2] : (sorted[sorted.Length / 2 - 1] + sorted[sorted.Length / 2]) / 2;

    private static string LoadAverage()
    {
        try
        {
            return string.Join(' ', File.ReadAllText("/proc/loadavg").Split(' ').Take(3));
        }
        catch (IOException)
        {
            return "unknown";
        }
    }
}
