namespace TaskPhrase.Hosting;

/// <summary>Loading compiled index files (TaskIndex) into the service.</summary>
internal static class IndexSupport
{
    public static string Unavailable(string path)
        => $"{TaskPhraseOptions.SectionName}:IndexPath: '{path}': this version cannot serve compiled index files yet. Serve the registry YAML file with {TaskPhraseOptions.SectionName}:RegistryPath instead.";
}
