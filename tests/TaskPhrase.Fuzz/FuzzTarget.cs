namespace TaskPhrase.Fuzz;

/// <summary>
/// One fuzz target: feeds the bytes of one input to a library entry point. The body catches the exceptions that
/// the entry point documents for bad input; anything else escaping it (or an <see cref="InvariantViolation"/>)
/// is a crash.
/// </summary>
/// <param name="Name">The name given on the command line (<c>registry</c>, <c>probes</c>, …).</param>
/// <param name="Description">What the target feeds and what it checks.</param>
/// <param name="SeedDirectories">Fixture folders (relative to the repository root) whose files seed the corpus.</param>
/// <param name="Body">Runs one input.</param>
internal sealed record FuzzTarget(string Name, string Description, IReadOnlyList<string> SeedDirectories, Action<byte[]> Body);
