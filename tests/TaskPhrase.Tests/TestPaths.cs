namespace TaskPhrase.Tests;

/// <summary>Locates the repository and the shared datasets from the test's output folder.</summary>
public static class TestPaths
{
    /// <summary>The repository root (the folder holding TaskPhrase.sln).</summary>
    public static string RepoRoot { get; } = FindRepoRoot();

    /// <summary>CLINC150 train/validation JSON (Larson et al., 2019), in shared/ beside the repository.</summary>
    public static string Clinc150 => Path.GetFullPath(Path.Combine(RepoRoot, "..", "shared", "datasets", "clinc150", "clinc150_train_val.json"));

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
