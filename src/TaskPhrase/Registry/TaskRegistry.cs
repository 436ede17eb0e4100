namespace TaskPhrase.Registry;

/// <summary>
/// An approved, validated task registry (version 1). Immutable; an instance that exists is valid.
/// Load one with <c>RegistryLoader</c>.
/// </summary>
public sealed class TaskRegistry
{
    /// <summary>Creates a registry from already validated parts. Prefer the loader, which validates.</summary>
    public TaskRegistry(IReadOnlyList<TaskDefinition> tasks, RegistryDefaults defaults, string contentHash,
        string? modelId = null, string? sourcePath = null, RegistrySettings? settings = null)
    {
        ArgumentNullException.ThrowIfNull(tasks);
        ArgumentNullException.ThrowIfNull(defaults);
        ArgumentException.ThrowIfNullOrEmpty(contentHash);
        Tasks = tasks;
        Defaults = defaults;
        ContentHash = contentHash;
        ModelId = modelId;
        SourcePath = sourcePath;
        Settings = settings ?? RegistrySettings.Default;
        var byId = new Dictionary<string, TaskDefinition>(StringComparer.Ordinal);
        foreach (var t in tasks) byId.Add(t.Id, t);
        _byId = byId;
    }

    private readonly Dictionary<string, TaskDefinition> _byId;

    /// <summary>The tasks in registry order.</summary>
    public IReadOnlyList<TaskDefinition> Tasks { get; }

    /// <summary>Registry-wide thresholds.</summary>
    public RegistryDefaults Defaults { get; }

    /// <summary>Optional resolver settings (scoring strategy, hazard words).</summary>
    public RegistrySettings Settings { get; }

    /// <summary>The model id the thresholds were tuned for, if stated.</summary>
    public string? ModelId { get; }

    /// <summary>SHA-256 (lower-case hex) over the canonical form of the registry; comments and formatting do not change it.</summary>
    public string ContentHash { get; }

    /// <summary>The file the registry was read from, if any.</summary>
    public string? SourcePath { get; }

    /// <summary>Finds a task by id.</summary>
    public TaskDefinition? Find(string id) => _byId.GetValueOrDefault(id);

    /// <summary>The accept threshold in force for <paramref name="task"/>.</summary>
    public float AcceptFor(TaskDefinition task) => task.Accept ?? Defaults.Accept;

    /// <summary>The margin in force for <paramref name="task"/>.</summary>
    public float MarginFor(TaskDefinition task) => task.Margin ?? Defaults.Margin;
}
