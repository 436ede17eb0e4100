namespace TaskPhrase.Tests;

/// <summary>Locates the repository and the shared datasets from the test's output folder.</summary>
public static class TestPaths
{
    /// <summary>The repository root (the folder holding TaskPhrase.sln).</summary>
    public static string RepoRoot { get; } = FindRepoRoot();

    /// <summary>
    /// CLINC150 train/validation JSON (Larson et al., 2019): <c>$TASKPHRASE_DATASETS/clinc150/</c> when set, else
    /// <c>shared/datasets/clinc150/</c> beside the repository (where CI and every checkout find it).
    /// </summary>
    public static string Clinc150
    {
        get
        {
            string? root = Environment.GetEnvironmentVariable("TASKPHRASE_DATASETS");
            string path = root is { Length: > 0 }
                ? Path.Combine(root, "clinc150", "clinc150_train_val.json")
                : Path.GetFullPath(Path.Combine(RepoRoot, "..", "shared", "datasets", "clinc150", "clinc150_train_val.json"));
            if (!File.Exists(path))
                throw new FileNotFoundException($"CLINC150 not found at {path}: put shared/ beside the repository or set TASKPHRASE_DATASETS.", path);
            return path;
        }
    }

    /// <summary>A file under tests/data, copied beside the test assembly.</summary>
    public static string Data(params string[] parts) => Path.Combine([AppContext.BaseDirectory, "data", .. parts]);

    /// <summary>A file under examples/.</summary>
    public static string Example(params string[] parts) => Path.Combine([RepoRoot, "examples", .. parts]);

    private static string FindRepoRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
            if (File.Exists(Path.Combine(dir.FullName, "TaskPhrase.sln"))) return dir.FullName;
        throw new DirectoryNotFoundException($"TaskPhrase.sln not found above {AppContext.BaseDirectory}.");
    }
}
