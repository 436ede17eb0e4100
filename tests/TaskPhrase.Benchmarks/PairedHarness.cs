using System.Globalization;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>paired</c>: the headline ratio. Runs the bare forward pass (<see cref="RawForward"/>), the embedder and the
/// full resolve of the same 12-token command interleaved, in a fresh random order every round, so that whatever the
/// other tenants of the machine do lands on all three alike. Reports median, p90, p99 and max of each, the ratio of
/// the medians resolve / raw with a 95 % bootstrap interval (resampling whole rounds), and the managed bytes
/// allocated per call. The raw pass runs on the embedder's own session (same thread pool and settings).
/// <c>--load N</c> adds N competing busy threads for the p99 check; <c>--aa</c> adds a bare pass on a second session
/// made with the same options (how far two identical sessions differ on this machine).
/// </summary>
internal static class PairedHarness
{
    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "rounds", "warmup", "threads", "spin", "load", "aa");
        int rounds = Math.Max(10, a.Int("rounds", 2000)), warmup = a.Int("warmup", 200), threads = a.Int("threads", 2), load = a.Int("load", 0);
        bool spin = a.Flag("spin");

        using var setup = new ModelSetup(threads, spin);
        var vector = new float[setup.Embedder.Model.Dimensions];
        var raw = new Samples("raw forward (baseline)", rounds);
        var embed = new Samples("embed", rounds);
        var resolve = new Samples("resolve (model path)", rounds);
        List<Action> ops = [() => setup.Raw.Run(), () => setup.Embedder.Embed(ModelSetup.Command, vector), () => setup.Resolver.Resolve(ModelSetup.Command)];
        List<Samples> samples = [raw, embed, resolve];
        using var second = a.Flag("aa") ? setup.SecondRaw() : null;
        if (second is not null)
        {
            ops.Add(() => second.Run());
            samples.Add(new Samples("raw forward, own session", rounds));
        }

        for (int i = 0; i < warmup; i++) foreach (var op in ops) op();
        using var competing = load > 0 ? new CompetingLoad(load) : null;
        var random = new Random(7);
        int[] order = Enumerable.Range(0, ops.Count).ToArray();
        var allocated = new long[ops.Count];
        for (int i = 0; i < rounds; i++)
        {
            random.Shuffle(order);
            foreach (int k in order)
            {
                long before = GC.GetAllocatedBytesForCurrentThread();
                samples[k].Time(ops[k]);
                allocated[k] += GC.GetAllocatedBytesForCurrentThread() - before;
            }
        }

        Console.WriteLine($"paired: {rounds} rounds (random order each round) after {warmup} warm-up rounds; \"{ModelSetup.Command}\" ({setup.Raw.TokenCount} tokens)");
        Console.WriteLine($"intra-op threads {threads}, spinning {(spin ? "on" : "off")}, competing busy threads {load}, {Environment.ProcessorCount} logical CPUs");
        Console.WriteLine();
        Console.WriteLine(Samples.Header);
        foreach (var s in samples) Console.WriteLine(s.Row());
        Console.WriteLine();
        var (lo, hi) = BootstrapRatio(raw, resolve, random);
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"resolve / raw, ratio of medians: {resolve.Median / raw.Median:0.000} (95 % bootstrap interval {lo:0.000}–{hi:0.000}); median of per-round ratios {PerRoundRatio(raw, resolve):0.000}"));
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"embed / raw, ratio of medians: {embed.Median / raw.Median:0.000}; resolve p99 / median {resolve.Percentile(99) / resolve.Median:0.00}"));
        Console.WriteLine($"managed allocation per call (this thread, timing included): raw {allocated[0] / rounds} B, embed {allocated[1] / rounds} B, resolve {allocated[2] / rounds} B");
        if (second is not null)
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"own session / embedder's session, ratio of medians {samples[3].Median / raw.Median:0.000}"));
        Console.WriteLine($"managed allocation per resolve (this thread, 200 calls each): exact match \"{ModelSetup.ExactCommand}\" {AllocatedPerCall(() => setup.Resolver.Resolve(ModelSetup.ExactCommand))} B, " +
            $"typing slip corrected \"{ModelSetup.SlipCommand}\" {AllocatedPerCall(() => setup.Resolver.Resolve(ModelSetup.SlipCommand))} B");
    }

    private static long AllocatedPerCall(Action op)
    {
        for (int i = 0; i < 20; i++) op();
        long before = GC.GetAllocatedBytesForCurrentThread();
        for (int i = 0; i < 200; i++) op();
        return (GC.GetAllocatedBytesForCurrentThread() - before) / 200;
    }

    private static double PerRoundRatio(Samples raw, Samples other)
    {
        var ratios = new Samples("ratio", raw.Count);
        for (int i = 0; i < raw.Count; i++) ratios.Add(other.Values[i] / raw.Values[i]);
        return ratios.Median;
    }

    private static (double Low, double High) BootstrapRatio(Samples raw, Samples other, Random random)
    {
        const int resamples = 1000;
        int n = raw.Count;
        var ratios = new double[resamples];
        var a = new double[n];
        var b = new double[n];
        for (int r = 0; r < resamples; r++)
        {
            for (int i = 0; i < n; i++)
            {
                int k = random.Next(n);
                a[i] = raw.Values[k];
                b[i] = other.Values[k];
            }
            Array.Sort(a);
            Array.Sort(b);
            ratios[r] = b[n / 2] / a[n / 2];
        }
        Array.Sort(ratios);
        return (ratios[(int)(resamples * 0.025)], ratios[(int)(resamples * 0.975) - 1]);
    }
}
