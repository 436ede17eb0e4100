namespace TaskPhrase.Hosting.Tests;

/// <summary>Locates the repository and the example data from the test's output folder.</summary>
public static class TestPaths
{
    /// <summary>The repository root (the folder holding TaskPhrase.sln).</summary>
    public static string RepoRoot { get; } = FindRepoRoot();

    /// <summary>A file under examples/, copied beside the test assembly.</summary>
    public static string Example(params string[] parts) => Path.Combine([AppContext.BaseDirectory, "examples", .. parts]);

    /// <summary>The Harbor Street example registry.</summary>
    public static string HarborRegistry => Example("harbor-street", "registry.yaml");

    private static string FindRepoRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
            if (File.Exists(Path.Combine(dir.FullName, "TaskPhrase.sln"))) return dir.FullName;
        throw new DirectoryNotFoundException($"TaskPhrase.sln not found above {AppContext.BaseDirectory}.");
    }
}
