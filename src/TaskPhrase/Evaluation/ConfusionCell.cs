namespace TaskPhrase.Evaluation;

/// <summary>One non-zero cell of a <see cref="ConfusionTable"/>. Immutable.</summary>
/// <param name="Expected">Expected label: a task id or <c>reject</c>.</param>
/// <param name="Actual">Actual label: a task id, <c>rejected</c> or <c>ambiguous</c>.</param>
/// <param name="Count">Number of probes.</param>
public sealed record ConfusionCell(string Expected, string Actual, int Count);
