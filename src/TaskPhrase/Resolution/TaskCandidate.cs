namespace TaskPhrase.Resolution;

/// <summary>A scored task candidate: the task, its best-matching approved phrase and the task's score.</summary>
/// <param name="TaskId">The task id.</param>
/// <param name="Phrase">The task's approved phrase nearest to the utterance.</param>
/// <param name="Score">The task's score under the registry's scoring strategy (cosine-like, higher is closer).</param>
public sealed record TaskCandidate(string TaskId, string Phrase, float Score);
