using System.Diagnostics;
using System.Globalization;
using TaskPhrase.Onnx;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// <c>coldstart</c>: wall time and peak resident memory of whole <c>taskphrase resolve --index</c> processes
/// (runtime start, model load with its SHA-256 check, index load, one resolve, exit), over a 1,000-phrase index built
/// here with the real model. Needs the CLI built in Release (<c>dotnet build src/TaskPhrase.Cli -c Release</c>);
/// peak memory comes from <c>/usr/bin/time</c> when it exists. <c>--runs N</c> (default 7); the floor
/// <c>taskphrase --version</c> (runtime and command-line parsing only) is measured alike. <c>--cli PATH</c> measures
/// another build of the CLI (for example a ReadyToRun publish: <c>dotnet publish src/TaskPhrase.Cli -c Release -r linux-x64
/// --self-contained false -p:PublishReadyToRun=true -o DIR</c>, then <c>--cli DIR/TaskPhrase.Cli.dll</c>).
/// </summary>
internal static class ColdStart
{
    private const string Command = "could you bring me the kettle from the kitchen";

    public static void Run(IEnumerable<string> args)
    {
        var a = new HarnessArguments(args, "runs", "rebuild", "cli", "model");
        int runs = Math.Max(1, a.Int("runs", 7));
        string cli = a.Text("cli", Path.Combine(BenchmarkPaths.RepoRoot, "src", "TaskPhrase.Cli", "bin", "Release", "net10.0", "TaskPhrase.Cli.dll"));
        if (!File.Exists(cli)) throw new FileNotFoundException($"{cli} not found; build it first: dotnet build src/TaskPhrase.Cli -c Release.");
        // --model DIR: another model directory (e.g. the int8 variant) for both the index and the CLI.
        string model = a.Text("model", "");
        string index = Path.Combine(BenchmarkPaths.Scratch, model.Length == 0 ? "coldstart-1000.tpx" : $"coldstart-1000-{Path.GetFileName(Path.TrimEndingDirectorySeparator(Path.GetFullPath(model)))}.tpx");
        if (!File.Exists(index) || a.Flag("rebuild"))
        {
            using var embedder = OnnxEmbedder.Create(model.Length == 0 ? BenchmarkPaths.ModelDirectory : model);
            TaskIndexBuilder.BuildAsync(index, SyntheticRegistry.Load(100, 10), embedder).GetAwaiter().GetResult();
        }
        bool haveTime = File.Exists("/usr/bin/time");
        Console.WriteLine($"coldstart: {runs} runs each, after one untimed run (disk cache warm); index {index} (1,000 phrases)");
        Console.WriteLine();
        Console.WriteLine("| process | median wall | fastest | slowest | peak RSS (max) |");
        Console.WriteLine("| --- | ---: | ---: | ---: | ---: |");
        Measure("taskphrase --version", cli, ["--version"], runs, haveTime);
        string[] resolve = model.Length == 0 ? ["resolve", "--index", index, Command] : ["resolve", "--index", index, "--model", model, Command];
        Measure($"taskphrase resolve --index (1 command{(model.Length == 0 ? "" : ", " + model)})", cli, resolve, runs, haveTime);
    }

    private static void Measure(string name, string cli, string[] arguments, int runs, bool haveTime)
    {
        var walls = new Samples(name, runs);
        long peakKb = 0;
        for (int i = 0; i <= runs; i++)
        {
            var info = new ProcessStartInfo(haveTime ? "/usr/bin/time" : "dotnet") { RedirectStandardOutput = true, RedirectStandardError = true };
            if (haveTime) foreach (var x in new[] { "-f", "%M", "dotnet" }) info.ArgumentList.Add(x);
            info.ArgumentList.Add(cli);
            foreach (var x in arguments) info.ArgumentList.Add(x);
            long start = Stopwatch.GetTimestamp();
            using var process = Process.Start(info) ?? throw new InvalidOperationException("Could not start dotnet.");
            var stdout = process.StandardOutput.ReadToEndAsync();
            string stderr = process.StandardError.ReadToEnd();
            process.WaitForExit();
            double us = Stopwatch.GetElapsedTime(start).TotalMicroseconds;
            if (process.ExitCode != 0)
                throw new InvalidOperationException($"{name} exited with {process.ExitCode}: {stderr.Trim()} {stdout.Result.Trim()}");
            if (i == 0) continue;
            walls.Add(us);
            if (haveTime && long.TryParse(stderr.Trim().Split('\n')[^1], NumberStyles.Integer, CultureInfo.InvariantCulture, out long kb))
                peakKb = Math.Max(peakKb, kb);
        }
        string peak = haveTime ? $"{peakKb / 1024.0:0} MiB" : "n/a";
        Console.WriteLine($"| {name} | {Samples.Us(walls.Median)} | {Samples.Us(walls.Percentile(0))} | {Samples.Us(walls.Percentile(100))} | {peak} |");
    }
}
