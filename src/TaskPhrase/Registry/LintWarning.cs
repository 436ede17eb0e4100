using System.Globalization;

namespace TaskPhrase.Registry;

/// <summary>One finding of <see cref="RegistryLinter"/> for task authors. Immutable.</summary>
/// <param name="Code">Stable kebab-case code, one of <see cref="LintCodes"/>.</param>
/// <param name="TaskId">The task the finding is about.</param>
/// <param name="Phrase">The phrase concerned, or null when the finding is about the whole task.</param>
/// <param name="OtherTaskId">The other task involved (collisions, centroids, confirm checks), or null.</param>
/// <param name="OtherPhrase">The other phrase involved, or null.</param>
/// <param name="Similarity">Cosine similarity behind the finding (between the two phrases, or to the other task's centroid), or null.</param>
/// <param name="Message">What was found and what to do, naming both phrases and their similarity when there are two.</param>
public sealed record LintWarning(
    string Code, string TaskId, string? Phrase, string? OtherTaskId, string? OtherPhrase, float? Similarity, string Message)
{
    /// <summary>Compiler-style text: <c>warning cross-task-collision: message</c>.</summary>
    public override string ToString() => string.Create(CultureInfo.InvariantCulture, $"warning {Code}: {Message}");
}
