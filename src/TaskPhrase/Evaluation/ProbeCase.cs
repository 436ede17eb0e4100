namespace TaskPhrase.Evaluation;

/// <summary>One row of a probe suite: a test utterance and what it should resolve to.</summary>
/// <param name="Utterance">The test utterance.</param>
/// <param name="Expect">A task id, or <see cref="Reject"/> for an out-of-scope probe.</param>
/// <param name="Kind">Optional kind label (e.g. <c>paraphrase</c>, <c>negated</c>, <c>nonsense</c>).</param>
/// <param name="Note">Optional free-text note.</param>
/// <param name="Line">1-based line of the row in its file (0 when not read from a file).</param>
public sealed record ProbeCase(string Utterance, string Expect, string? Kind = null, string? Note = null, int Line = 0)
{
    /// <summary>The <c>expect</c> value of out-of-scope probes.</summary>
    public const string Reject = "reject";

    /// <summary>True when the probe expects a task (in-scope probe).</summary>
    public bool IsInScope => !string.Equals(Expect, Reject, StringComparison.Ordinal);
}
