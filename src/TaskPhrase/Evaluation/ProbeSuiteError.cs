namespace TaskPhrase.Evaluation;

/// <summary>One problem found in a probe suite: where it is and what to do about it. Immutable.</summary>
/// <param name="Source">The file path or source name the suite was read from.</param>
/// <param name="Line">1-based line where the offending row starts; 0 for a problem with the whole file.</param>
/// <param name="Message">What is wrong and what to do, in one sentence.</param>
public sealed record ProbeSuiteError(string Source, int Line, string Message)
{
    /// <summary>The error as <c>source:line: message</c> (or <c>source: message</c> when there is no line).</summary>
    public override string ToString() => Line > 0 ? $"{Source}:{Line}: {Message}" : $"{Source}: {Message}";
}
