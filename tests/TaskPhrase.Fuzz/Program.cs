using System.Diagnostics;
using SharpFuzz;

namespace TaskPhrase.Fuzz;

/// <summary>
/// Entry point of the fuzzing harness.
/// <list type="bullet">
/// <item><description><c>fuzz TARGET</c>: run under afl-fuzz (SharpFuzz out-of-process fork server); see run-fuzz.sh.</description></item>
/// <item><description><c>replay TARGET|all [DIR…]</c>: run every file of the target's seed folders, its committed corpus
/// (<c>tests/TaskPhrase.Fuzz/corpus/TARGET</c>), its crash regressions (<c>tests/TaskPhrase.Fuzz/regressions/TARGET</c>: inputs
/// that once crashed it) and any DIR through the target in-process; exit 1 if any input crashes.</description></item>
/// <item><description><c>collect TARGET DIR</c>: copy the target's seeds and committed corpus into DIR (afl-fuzz's <c>-i</c>).</description></item>
/// <item><description><c>seed DIR</c>: write the generated index seeds; <c>list</c>: print the targets.</description></item>
/// </list>
/// </summary>
internal static class Program
{
    private static int Main(string[] args)
    {
        string mode = args.Length > 0 ? args[0] : "list";
        switch (mode)
        {
            case "fuzz" when args.Length == 2:
                var target = FuzzTargets.Find(args[1]);
                Fuzzer.OutOfProcess.Run(stream =>
                {
                    using var buffer = new MemoryStream();
                    stream.CopyTo(buffer);
                    target.Body(buffer.ToArray());
                });
                return 0;
            case "replay" when args.Length >= 2:
                return Replay(args[1], args[2..]);
            case "collect" when args.Length == 3:
                return Collect(FuzzTargets.Find(args[1]), args[2]);
            case "seed" when args.Length == 2:
                FuzzTargets.WriteIndexSeeds(RepoRoot(), args[1]);
                return 0;
            case "list":
                foreach (var t in FuzzTargets.All) Console.WriteLine($"{t.Name,-12} {t.Description}");
                return 0;
            default:
                Console.Error.WriteLine("usage: TaskPhrase.Fuzz fuzz TARGET | replay TARGET|all [DIR...] | seed DIR | list");
                return 2;
        }
    }

    /// <summary>The seed files and the committed corpus of a target, plus any extra folders.</summary>
    private static List<string> Inputs(FuzzTarget target, string root, IEnumerable<string> extra)
        => target.SeedDirectories.Select(d => Path.Combine(root, d))
            .Append(Path.Combine(root, "tests/TaskPhrase.Fuzz/corpus", target.Name))
            .Append(Path.Combine(root, "tests/TaskPhrase.Fuzz/regressions", target.Name))
            .Concat(extra)
            .Where(Directory.Exists)
            .SelectMany(d => Directory.EnumerateFiles(d, "*", SearchOption.AllDirectories))
            .Where(f => !Path.GetFileName(f).StartsWith('.') && !f.EndsWith(".md", StringComparison.Ordinal))
            .Order(StringComparer.Ordinal)
            .ToList();

    private static int Collect(FuzzTarget target, string directory)
    {
        Directory.CreateDirectory(directory);
        int copied = 0;
        foreach (var (file, i) in Inputs(target, RepoRoot(), []).Select((f, i) => (f, i)))
        {
            // afl-fuzz wants small seeds; the fixtures are all well under this.
            if (new FileInfo(file).Length > 64 * 1024) continue;
            File.Copy(file, Path.Combine(directory, $"{i:D4}-{Path.GetFileName(file)}"), overwrite: true);
            copied++;
        }
        Console.WriteLine($"{target.Name}: {copied} seeds in {directory}");
        return copied > 0 ? 0 : 1;
    }

    private static int Replay(string name, string[] extra)
    {
        string root = RepoRoot();
        var targets = name == "all" ? FuzzTargets.All : [FuzzTargets.Find(name)];
        int inputs = 0, crashes = 0;
        foreach (var target in targets)
        {
            var files = Inputs(target, root, extra);
            var slowest = (Name: "", Ms: 0.0);
            int targetCrashes = 0;
            foreach (var file in files)
            {
                var watch = Stopwatch.StartNew();
                try
                {
                    target.Body(File.ReadAllBytes(file));
                }
                catch (Exception e)
                {
                    targetCrashes++;
                    Console.Error.WriteLine($"CRASH {target.Name} {Path.GetRelativePath(root, file)}: {e.GetType().Name}: {e.Message.ReplaceLineEndings(" ")}");
                    Console.Error.WriteLine(e.StackTrace);
                }
                double ms = watch.Elapsed.TotalMilliseconds;
                if (ms > slowest.Ms) slowest = (Path.GetFileName(file), ms);
            }
            Console.WriteLine($"{target.Name}: {files.Count} inputs replayed, {targetCrashes} crashes, slowest {slowest.Ms:0} ms ({slowest.Name})");
            inputs += files.Count;
            crashes += targetCrashes;
        }
        if (inputs == 0)
        {
            Console.Error.WriteLine("no inputs found: run from the repository or build output so the seed folders can be found.");
            return 1;
        }
        return crashes == 0 ? 0 : 1;
    }

    private static string RepoRoot()
    {
        foreach (var start in new[] { Environment.CurrentDirectory, AppContext.BaseDirectory })
        {
            for (var dir = new DirectoryInfo(start); dir is not null; dir = dir.Parent)
                if (File.Exists(Path.Combine(dir.FullName, "TaskPhrase.sln"))) return dir.FullName;
        }
        throw new DirectoryNotFoundException("TaskPhrase.sln not found above the current or the application directory; run from the repository.");
    }
}
