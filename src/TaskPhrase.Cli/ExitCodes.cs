namespace TaskPhrase.Cli;

/// <summary>The exit codes of <c>taskphrase</c>, in one place (documented in the README).</summary>
internal static class ExitCodes
{
    /// <summary>Success (a rejected utterance is a normal outcome and also exits 0).</summary>
    public const int Success = 0;

    /// <summary>The check or a budget failed (<c>check</c> found errors, <c>audit</c>/<c>tune</c> missed a budget).</summary>
    public const int CheckFailed = 1;

    /// <summary>Bad usage or unreadable input (missing file, malformed registry, index or probe suite, tampered index).</summary>
    public const int BadInput = 2;
}
