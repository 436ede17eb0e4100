namespace TaskPhrase.Hosting;

/// <summary>
/// Settings of <see cref="TaskPhraseServiceCollectionExtensions.AddTaskPhrase(Microsoft.Extensions.DependencyInjection.IServiceCollection, Action{TaskPhraseOptions})"/>,
/// usually bound from the <c>TaskPhrase</c> configuration section. Validated when the host starts
/// (and at the latest when the resolver is first requested); every failure names the setting and what to do.
/// </summary>
public sealed class TaskPhraseOptions
{
    /// <summary>The configuration section bound by default: <c>TaskPhrase</c>.</summary>
    public const string SectionName = "TaskPhrase";

    /// <summary>
    /// Model directory (holding <c>model.onnx</c>, <c>vocab.txt</c>, <c>model.json</c>) or a built-in model id;
    /// null for the bundled all-MiniLM-L6-v2. Ignored when an embedding generator is supplied in code.
    /// </summary>
    public string? ModelDirectory { get; set; }

    /// <summary>Registry YAML file to serve. Exactly one of <see cref="RegistryPath"/> and <see cref="IndexPath"/> is required unless a registry is supplied in code.</summary>
    public string? RegistryPath { get; set; }

    /// <summary>Compiled index file (from <c>taskphrase build</c>) to serve instead of a registry file.</summary>
    public string? IndexPath { get; set; }

    /// <summary>Accept threshold for every task, overriding the registry's values; null keeps the registry's. Between 0 and 1.</summary>
    public float? Accept { get; set; }

    /// <summary>Margin for every task, overriding the registry's values; null keeps the registry's. Between 0 and 1.</summary>
    public float? Margin { get; set; }

    /// <summary>ONNX Runtime intra-op threads of the built-in embedder (default 2; 0 lets ONNX Runtime choose). Between 0 and 256.</summary>
    public int Threads { get; set; } = 2;

    /// <summary>Whether the registry (or index) file is watched and reloaded when it changes (default true).</summary>
    public bool WatchRegistry { get; set; } = true;

    /// <summary>How long the file must stay quiet after a change before it is reloaded (default 300 ms; editors write in several steps). Between 0 and 60 s.</summary>
    public TimeSpan ReloadDebounce { get; set; } = TimeSpan.FromMilliseconds(300);
}
