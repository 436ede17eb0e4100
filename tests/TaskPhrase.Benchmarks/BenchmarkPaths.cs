using TaskPhrase.Onnx;

namespace TaskPhrase.Benchmarks;

/// <summary>Where the benchmarks find the repository's example data and the built-in model.</summary>
internal static class BenchmarkPaths
{
    /// <summary>The repository root: the nearest folder above the running assembly that holds TaskPhrase.sln.</summary>
    public static string RepoRoot { get; } = FindRoot();

    /// <summary>The Harbor Street example registry (164 approved phrases in 12 tasks).</summary>
    public static string HarborRegistry => Path.Combine(RepoRoot, "examples", "harbor-street", "registry.yaml");

    /// <summary>The built-in all-MiniLM-L6-v2 directory: beside the app when copied there, else the repository's models/ folder.</summary>
    public static string ModelDirectory
    {
        get
        {
            try
            {
                return BuiltInModels.Locate(BuiltInModels.MiniLmL6V2);
            }
            catch (DirectoryNotFoundException)
            {
                return Path.Combine(RepoRoot, "models", BuiltInModels.MiniLmL6V2);
            }
        }
    }

    /// <summary>A scratch folder for generated index files, under the system temp folder.</summary>
    public static string Scratch
    {
        get
        {
            string dir = Path.Combine(Path.GetTempPath(), "taskphrase-bench");
            Directory.CreateDirectory(dir);
            return dir;
        }
    }

    private static string FindRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            if (File.Exists(Path.Combine(dir.FullName, "TaskPhrase.sln"))) return dir.FullName;
        }
        throw new DirectoryNotFoundException($"No TaskPhrase.sln above {AppContext.BaseDirectory}; run the benchmarks from inside the repository.");
    }
}
