namespace TaskPhrase.Onnx;

/// <summary>
/// The models that ship with TaskPhrase (extracted at build time from their NuGet packages and copied
/// beside the application under <c>models/&lt;id&gt;/</c>).
/// </summary>
public static class BuiltInModels
{
    /// <summary>all-MiniLM-L6-v2: 384 dimensions, mean pooling, uncased WordPiece. The default.</summary>
    public const string MiniLmL6V2 = "all-minilm-l6-v2";

    /// <summary>snowflake-arctic-embed-xs: 384 dimensions, CLS pooling.</summary>
    public const string ArcticEmbedXs = "snowflake-arctic-embed-xs";

    /// <summary>Environment variable that points at a folder holding model directories, checked before the application folder.</summary>
    public const string ModelsEnvironmentVariable = "TASKPHRASE_MODELS";

    /// <summary>The ids of the built-in models.</summary>
    public static IReadOnlyList<string> Ids { get; } = [MiniLmL6V2, ArcticEmbedXs];

    /// <summary>
    /// Finds the directory of a built-in model: <c>$TASKPHRASE_MODELS/&lt;id&gt;</c>, then
    /// <c>&lt;app folder&gt;/models/&lt;id&gt;</c>.
    /// </summary>
    /// <exception cref="DirectoryNotFoundException">The model's files were not found; the message lists where it looked.</exception>
    public static string Locate(string id = MiniLmL6V2)
    {
        ArgumentException.ThrowIfNullOrEmpty(id);
        var tried = new List<string>();
        string? env = Environment.GetEnvironmentVariable(ModelsEnvironmentVariable);
        if (!string.IsNullOrEmpty(env)) tried.Add(Path.Combine(env, id));
        tried.Add(Path.Combine(AppContext.BaseDirectory, "models", id));
        foreach (var dir in tried)
        {
            if (File.Exists(Path.Combine(dir, "model.onnx")) && File.Exists(Path.Combine(dir, "vocab.txt"))) return dir;
        }
        throw new DirectoryNotFoundException(
            $"Built-in model '{id}' not found (looked in: {string.Join(", ", tried)}). Build the project so the model is extracted from its NuGet package, or pass --model DIR.");
    }
}
