using System.ComponentModel;
using System.Diagnostics;
using System.Globalization;
using System.Numerics.Tensors;
using System.Text;
using System.Text.Json;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>peers-js</c>: TaskPhrase against transformers.js (the npm package @huggingface/transformers 4.3.1 on
/// onnxruntime-node, feature-extraction pipeline with mean pooling and normalisation, fp32 on the CPU) embedding the
/// same all-MiniLM-L6-v2 ONNX file. The peer is a long-lived Node child process (<c>peers-js/peer.mjs</c>) driven
/// over stdin/stdout; its model folder is laid out from the bundled files, with a tokenizer.json generated from
/// vocab.txt. Before any timing it checks that the two do the same work: the peer tokenises the first
/// <c>--tokens</c> CLINC150 validation queries (Larson et al., 2019) to the same ids as TaskPhrase's tokenizer, and
/// its embedding of <see cref="ModelSetup.Command"/> agrees with TaskPhrase's (cosine ≥ 0.999). Then, for each round
/// after warm-up, three blocks in a fresh random order: <c>--block</c> TaskPhrase resolves (model path, in process),
/// the same number of raw forward passes (baseline), and one <c>run B</c> of the peer (B pipeline calls timed in Node
/// with process.hrtime.bigint). While one process works the other waits on a pipe, so they do not compete for the
/// cores. Reports medians, p99, managed allocation and CPU time per call, and both processes' peak RSS.
/// </summary>
internal static class JsPeerHarness
{
    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "rounds", "warmup", "block", "threads", "spin", "node", "tokens");
        int rounds = Math.Max(5, a.Int("rounds", 200)), warmup = a.Int("warmup", 10), block = Math.Max(1, a.Int("block", 10));
        int threads = a.Int("threads", 2), tokens = a.Int("tokens", 1000);
        bool spin = a.Flag("spin");

        using var setup = new ModelSetup(threads, spin);
        using var peer = NodePeer.Start(a.Text("node", "node"), setup.Embedder.Model.Dimensions, threads, spin);

        int tokenised = CheckTokenizer(setup, peer, tokens);
        var vector = new float[setup.Embedder.Model.Dimensions];
        setup.Embedder.Embed(ModelSetup.Command, vector);
        float agreement = TensorPrimitives.CosineSimilarity(vector, peer.Embed(ModelSetup.Command));
        if (!(agreement >= 0.999f))
            throw new InvalidOperationException($"transformers.js's embedding of \"{ModelSetup.Command}\" differs from TaskPhrase's (cosine {agreement:0.0000}); not the same work, no comparison.");

        var resolve = new Samples("TaskPhrase resolve (model path)", rounds * block);
        var raw = new Samples("raw forward (baseline)", rounds * block);
        var js = new Samples("transformers.js pipeline (embedding only)", rounds * block);
        var allocated = new long[2];
        var cpu = new TimeSpan[3];
        using var self = Process.GetCurrentProcess();
        void Block(int k, bool record)
        {
            if (k == 2)
            {
                TimeSpan before = peer.CpuTime();
                double[] durations = peer.Run(block);
                TimeSpan used = peer.CpuTime() - before;
                if (!record) return;
                cpu[2] += used;
                foreach (double d in durations) js.Add(d);
                return;
            }
            var samples = k == 0 ? resolve : raw;
            Action op = k == 0 ? () => setup.Resolver.Resolve(ModelSetup.Command) : () => setup.Raw.Run();
            self.Refresh();
            TimeSpan cpuBefore = self.TotalProcessorTime;
            long bytesBefore = GC.GetAllocatedBytesForCurrentThread();
            for (int i = 0; i < block; i++)
            {
                if (record) samples.Time(op);
                else op();
            }
            if (!record) return;
            allocated[k] += GC.GetAllocatedBytesForCurrentThread() - bytesBefore;
            self.Refresh();
            cpu[k] += self.TotalProcessorTime - cpuBefore;
        }

        for (int i = 0; i < warmup; i++) for (int k = 0; k < 3; k++) Block(k, record: false);
        var random = new Random(13);
        int[] order = [0, 1, 2];
        for (int i = 0; i < rounds; i++)
        {
            random.Shuffle(order);
            foreach (int k in order) Block(k, record: true);
        }

        string peerMemory = peer.Memory();
        int calls = rounds * block;
        Console.WriteLine($"peers-js: {rounds} rounds of 3 blocks of {block} calls (random block order each round) after {warmup} warm-up rounds; \"{ModelSetup.Command}\" ({setup.Raw.TokenCount} tokens)");
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"intra-op threads {threads}, spinning {(spin ? "on" : "off")}, {Environment.ProcessorCount} logical CPUs; peer {peer.Info}"));
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"same work: {tokenised} CLINC150 validation queries tokenised to the same ids; embeddings agree (cosine {agreement:0.00000}); load average {LoadAverage()}"));
        Console.WriteLine();
        Console.WriteLine("| operation | runs | median | p90 | p99 | max | p99 / median | allocated per call | CPU per call |");
        Console.WriteLine("| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |");
        Console.WriteLine($"{raw.Row()} {allocated[1] / calls:N0} B | {Samples.Us(cpu[1].TotalMicroseconds / calls)} |");
        Console.WriteLine($"{resolve.Row()} {allocated[0] / calls:N0} B | {Samples.Us(cpu[0].TotalMicroseconds / calls)} |");
        Console.WriteLine($"{js.Row()} (other process) | {Samples.Us(cpu[2].TotalMicroseconds / calls)} |");
        Console.WriteLine();
        Console.WriteLine($"memory: TaskPhrase process peak RSS {Status("VmHWM")}, RSS {Status("VmRSS")}, managed heap {GC.GetTotalMemory(false) >> 20} MiB (this process also holds the harness and the raw-forward buffers); " +
            $"transformers.js process {peerMemory}");
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"ratio of medians to the raw forward: TaskPhrase resolve {resolve.Median / raw.Median:0.000}, transformers.js {js.Median / raw.Median:0.000}; transformers.js / TaskPhrase resolve {js.Median / resolve.Median:0.000}"));
    }

    /// <summary>Compares the peer's token ids with TaskPhrase's tokenizer on the first <paramref name="count"/> CLINC150 validation queries.</summary>
    private static int CheckTokenizer(ModelSetup setup, NodePeer peer, int count)
    {
        if (count == 0) return 0;
        string path = Path.GetFullPath(Path.Combine(BenchmarkPaths.RepoRoot, "..", "shared", "datasets", "clinc150", "clinc150_train_val.json"));
        if (!File.Exists(path))
            throw new FileNotFoundException($"The tokenizer check needs the CLINC150 validation split at {path}; put shared/datasets beside the repository or pass --tokens 0 to skip the check.", path);
        using var doc = JsonDocument.Parse(File.ReadAllBytes(path));
        var queries = doc.RootElement.GetProperty("val").EnumerateArray().Select(r => r[0].GetString()!).Take(count).ToList();
        var ids = new long[setup.Embedder.Model.MaxTokens];
        var mask = new long[ids.Length];
        foreach (string query in queries)
        {
            var (n, truncated) = setup.Tokenizer.Encode(query, ids, mask);
            long[] theirs = peer.Ids(query);
            if (truncated || !theirs.AsSpan().SequenceEqual(ids.AsSpan(0, n)))
                throw new InvalidOperationException($"The generated tokenizer.json tokenises the CLINC150 query \"{query}\" as [{string.Join(", ", theirs)}], TaskPhrase as [{string.Join(", ", ids.Take(n))}]{(truncated ? " (cut)" : "")}; not the same work, no comparison.");
        }
        return queries.Count;
    }

    private static string Status(string key)
        => File.ReadLines("/proc/self/status").FirstOrDefault(l => l.StartsWith(key, StringComparison.Ordinal))?.Split(':')[1].Trim() ?? "?";

    private static string LoadAverage()
    {
        try { return string.Join(' ', File.ReadAllText("/proc/loadavg").Split(' ').Take(3)); }
        catch (IOException) { return "unknown"; }
    }

    /// <summary>The Node child process running peers-js/peer.mjs: one command line in, one answer line out.</summary>
    private sealed class NodePeer : IDisposable
    {
        private readonly Process _process;
        private readonly StringBuilder _stderr = new();
        private readonly int _dimensions;

        private NodePeer(Process process, int dimensions)
        {
            _process = process;
            _dimensions = dimensions;
            Info = "";
        }

        /// <summary>The peer's versions and session options, as it reported them.</summary>
        public string Info { get; private set; }

        public static NodePeer Start(string node, int dimensions, int threads, bool spin)
        {
            string folder = Path.Combine(BenchmarkPaths.RepoRoot, "tests", "TaskPhrase.Benchmarks", "peers-js");
            string script = Path.Combine(folder, "peer.mjs");
            if (!File.Exists(script))
                throw new FileNotFoundException($"The transformers.js peer script is missing at {script}.", script);
            if (!Directory.Exists(Path.Combine(folder, "node_modules", "@huggingface", "transformers")))
                throw new DirectoryNotFoundException($"transformers.js is not installed in {folder}; run `npm ci --prefix {Path.GetRelativePath(Environment.CurrentDirectory, folder)}` (Node 20 or later) and try again.");

            var start = new ProcessStartInfo(node)
            {
                WorkingDirectory = folder,
                RedirectStandardInput = true,
                RedirectStandardOutput = true,
                RedirectStandardError = true,
                UseShellExecute = false,
                StandardInputEncoding = new UTF8Encoding(false),
                StandardOutputEncoding = Encoding.UTF8,
            };
            foreach (string arg in new[] { script, "--model-dir", BenchmarkPaths.ModelDirectory, "--command", ModelSetup.Command, "--threads", threads.ToString(CultureInfo.InvariantCulture) })
                start.ArgumentList.Add(arg);
            if (spin) start.ArgumentList.Add("--spin");

            Process process;
            try
            {
                process = Process.Start(start) ?? throw new InvalidOperationException($"Could not start '{node}'.");
            }
            catch (Win32Exception e)
            {
                throw new InvalidOperationException($"Could not start Node ('{node}': {e.Message}); install Node 20 or later, or pass --node PATH.", e);
            }
            var peer = new NodePeer(process, dimensions);
            process.ErrorDataReceived += (_, e) => { if (e.Data is not null) lock (peer._stderr) peer._stderr.AppendLine(e.Data); };
            process.BeginErrorReadLine();
            try
            {
                string? ready = process.StandardOutput.ReadLine();
                if (ready != "ready") throw peer.Failure($"expected 'ready', got '{ready ?? "end of output"}'");
                peer.Info = peer.Ask("info");
            }
            catch
            {
                peer.Dispose();
                throw;
            }
            return peer;
        }

        public float[] Embed(string text)
        {
            float[] vector = JsonSerializer.Deserialize<float[]>(Ask("embed " + OneLine(text))) ?? [];
            return vector.Length == _dimensions ? vector : throw Failure($"embed answered {vector.Length} values, expected {_dimensions}");
        }

        public long[] Ids(string text) => JsonSerializer.Deserialize<long[]>(Ask("ids " + OneLine(text))) ?? [];

        /// <summary>Runs <paramref name="count"/> timed embeddings of the fixed command in the peer; microseconds each.</summary>
        public double[] Run(int count)
        {
            string[] parts = Ask("run " + count.ToString(CultureInfo.InvariantCulture)).Split(' ');
            if (parts.Length != count) throw Failure($"run {count} answered {parts.Length} durations");
            return parts.Select(p => long.Parse(p, CultureInfo.InvariantCulture) / 1000.0).ToArray();
        }

        /// <summary>The peer process's CPU time so far (user + system, all threads).</summary>
        public TimeSpan CpuTime()
        {
            string[] parts = Ask("cpu").Split(' ');
            return TimeSpan.FromMicroseconds(long.Parse(parts[0], CultureInfo.InvariantCulture) + long.Parse(parts[1], CultureInfo.InvariantCulture));
        }

        /// <summary>Peak and current RSS and the V8 heap of the peer process, for the report.</summary>
        public string Memory()
        {
            using var doc = JsonDocument.Parse(Ask("mem"));
            var m = doc.RootElement;
            return string.Create(CultureInfo.InvariantCulture,
                $"peak RSS {m.GetProperty("vmHwmKiB").GetInt64()} kB, RSS {m.GetProperty("vmRssKiB").GetInt64()} kB, V8 heap used {m.GetProperty("heapUsed").GetInt64() >> 20} MiB, external {m.GetProperty("external").GetInt64() >> 20} MiB");
        }

        private string Ask(string line)
        {
            _process.StandardInput.WriteLine(line);
            _process.StandardInput.Flush();
            string? answer = _process.StandardOutput.ReadLine();
            if (answer is null) throw Failure($"the peer ended while answering '{Head(line)}'");
            if (answer.StartsWith("ok ", StringComparison.Ordinal)) return answer[3..];
            throw Failure($"'{Head(line)}' answered '{Head(answer)}'");
        }

        private InvalidOperationException Failure(string what)
        {
            string stderr;
            lock (_stderr) stderr = _stderr.ToString().Trim();
            return new InvalidOperationException($"transformers.js peer (peers-js/peer.mjs): {what}.{(stderr.Length > 0 ? " Its error output: " + stderr : "")}");
        }

        private static string OneLine(string text) => text.ReplaceLineEndings(" ");

        private static string Head(string text) => text.Length <= 120 ? text : text[..120] + "…";

        public void Dispose()
        {
            try
            {
                if (!_process.HasExited)
                {
                    _process.StandardInput.WriteLine("quit");
                    _process.StandardInput.Flush();
                    if (!_process.WaitForExit(5000)) _process.Kill();
                }
            }
            catch (IOException)
            {
                // The pipe is already closed: the peer has gone.
            }
            _process.Dispose();
        }
    }
}
