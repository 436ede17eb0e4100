namespace TaskPhrase.Fuzz;

/// <summary>An input was accepted but broke a documented property (for example a round trip); treated as a crash.</summary>
internal sealed class InvariantViolation(string message) : Exception(message);
