using TaskPhrase.Resolution;

namespace TaskPhrase.Cli;

/// <summary>Adds FiLM conditioning to accepted resolutions (<c>resolve --film FILE</c>).</summary>
internal static class FilmSupport
{
    public static Func<Resolution.Resolution, Resolution.Resolution> Load(string path, TaskResolver resolver, ModelLease model)
        => throw new CliException("--film is not available in this build yet.");
}
