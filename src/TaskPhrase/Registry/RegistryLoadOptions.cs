namespace TaskPhrase.Registry;

/// <summary>
/// Bounds the loader enforces so that hostile or mistaken files are refused fast with bounded memory.
/// Immutable once built; every value is checked when set.
/// </summary>
public sealed class RegistryLoadOptions
{
    /// <summary>The defaults: 4 MiB, depth 8, 1,000 tasks, 20,000 phrases, 200,000 YAML nodes.</summary>
    public static RegistryLoadOptions Default { get; } = new();

    /// <summary>
    /// Largest accepted file (or UTF-8 text), in bytes. Default 4 MiB. A file's size is checked before it is read.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Set to less than 1 or more than 1 GiB.</exception>
    public long MaxFileBytes
    {
        get => _maxFileBytes;
        init
        {
            ArgumentOutOfRangeException.ThrowIfLessThan(value, 1L);
            ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 1L << 30);
            _maxFileBytes = value;
        }
    }

    /// <summary>
    /// Deepest nesting of YAML collections (mappings and lists). Default 8; a valid registry needs 4
    /// (registry → tasks → task → controller or phrases).
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Set to less than 4 or more than 64.</exception>
    public int MaxDepth
    {
        get => _maxDepth;
        init
        {
            ArgumentOutOfRangeException.ThrowIfLessThan(value, 4);
            ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 64);
            _maxDepth = value;
        }
    }

    /// <summary>Most tasks in one registry. Default 1,000.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Set to less than 1.</exception>
    public int MaxTasks
    {
        get => _maxTasks;
        init
        {
            ArgumentOutOfRangeException.ThrowIfLessThan(value, 1);
            _maxTasks = value;
        }
    }

    /// <summary>Most phrases (approved plus must_reject, over all tasks) in one registry. Default 20,000.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Set to less than 1.</exception>
    public int MaxPhrases
    {
        get => _maxPhrases;
        init
        {
            ArgumentOutOfRangeException.ThrowIfLessThan(value, 1);
            _maxPhrases = value;
        }
    }

    /// <summary>
    /// Most YAML nodes (scalars, lists, mappings) read before the file is refused. Default 200,000, well above
    /// what <see cref="MaxTasks"/> and <see cref="MaxPhrases"/> allow, so those limits are met first.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Set to less than 16.</exception>
    public int MaxNodes
    {
        get => _maxNodes;
        init
        {
            ArgumentOutOfRangeException.ThrowIfLessThan(value, 16);
            _maxNodes = value;
        }
    }

    private readonly long _maxFileBytes = 4L * 1024 * 1024;
    private readonly int _maxDepth = 8;
    private readonly int _maxTasks = 1_000;
    private readonly int _maxPhrases = 20_000;
    private readonly int _maxNodes = 200_000;
}
