namespace TaskPhrase.Evaluation;

/// <summary>One audit budget that was not met. Immutable.</summary>
/// <param name="Metric">The metric's report name, e.g. <c>false_accept_rate</c>.</param>
/// <param name="Actual">The value compared (the rate, or its interval bound when the budget asks for it); NaN when the suite could not measure it.</param>
/// <param name="Limit">The budget.</param>
/// <param name="Message">One line saying what was measured against what, and what to do.</param>
public sealed record BudgetViolation(string Metric, double Actual, double Limit, string Message);
