namespace TaskPhrase.Registry;

/// <summary>Registry-wide decision thresholds (the <c>defaults</c> block of a registry).</summary>
/// <param name="Accept">Cosine similarity the best task must reach to be accepted.</param>
/// <param name="Margin">How much the best task must beat the runner-up task by.</param>
public sealed record RegistryDefaults(float Accept, float Margin)
{
    /// <summary>
    /// Built-in defaults for all-MiniLM-L6-v2 (accept 0.60, margin 0.04), used when a registry gives none.
    /// </summary>
    public static RegistryDefaults Standard { get; } = new(0.60f, 0.04f);
}
