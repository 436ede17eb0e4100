using TaskPhrase.Registry;

namespace TaskPhrase.Hosting;

/// <summary>What the <see cref="TaskPhraseBuilder"/> set in code: a registry, a registry reader.</summary>
internal sealed class RegistrySources
{
    /// <summary>A registry given in code (no file, nothing to watch).</summary>
    public TaskRegistry? Registry { get; set; }

    /// <summary>Reads and validates a registry file; throws with a located message when it is broken.</summary>
    public Func<string, TaskRegistry> Loader { get; set; } = path => RegistryLoader.Load(path);
}
