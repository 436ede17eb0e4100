namespace TaskPhrase.Cli;

/// <summary>A failure the user caused and can fix: printed as one line, no stack trace, with an exit code.</summary>
internal sealed class CliException(string message, int exitCode = ExitCodes.BadInput, Exception? inner = null) : Exception(message, inner)
{
    public int ExitCode { get; } = exitCode;
}
