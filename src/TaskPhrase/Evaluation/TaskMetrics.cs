namespace TaskPhrase.Evaluation;

/// <summary>Precision and recall of one task over a probe suite. Immutable.</summary>
/// <param name="TaskId">The task id.</param>
/// <param name="Support">In-scope probes that expect this task.</param>
/// <param name="Predicted">Probes (in-scope or not) accepted as this task.</param>
/// <param name="Precision">Probes accepted as this task that expected it / <paramref name="Predicted"/>.</param>
/// <param name="Recall">Probes expecting this task that were accepted as it / <paramref name="Support"/>.</param>
public sealed record TaskMetrics(string TaskId, int Support, int Predicted, RateEstimate Precision, RateEstimate Recall);
