namespace TaskPhrase.Tests.Evaluation;

/// <summary>
/// A fact that needs Debian's headless Chromium at <see cref="Path"/>; without it the test is skipped with the reason.
/// </summary>
public sealed class ChromiumFactAttribute : FactAttribute
{
    public const string Path = "/usr/bin/chromium";

    public ChromiumFactAttribute()
    {
        if (!File.Exists(Path))
            Skip = $"Chromium is not installed at {Path}; install Debian's chromium package (apt-get install chromium) to run this rendering check.";
    }
}
