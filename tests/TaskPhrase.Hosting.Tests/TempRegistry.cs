namespace TaskPhrase.Hosting.Tests;

/// <summary>A registry file in a fresh temporary folder; written atomically (temp file + rename) like an editor's save.</summary>
public sealed class TempRegistry : IDisposable
{
    public const string ThreeTasks = """
        version: 1
        model: all-minilm-l6-v2
        tasks:
          - id: hall-light
            title: Press the hall light switch
            controller: {manifold: reach-press.v1, latent_dims: 1}
            phrases: [press the hall light switch, turn on the hall light, hall light]
          - id: water-basil
            title: Water the basil on the windowsill
            controller: {manifold: pour-arc.v2, latent_dims: 2}
            phrases: [water the basil, give the basil a drink]
            must_reject: [pour boiling water from the kettle on the basil]
          - id: fish-food
            title: Sprinkle food into the goldfish tank
            controller: {manifold: shake-over.v1, latent_dims: 1}
            phrases: [feed the fish, sprinkle food into the goldfish tank]
        """;

    /// <summary><see cref="ThreeTasks"/> plus keys-hook.</summary>
    public const string FourTasks = ThreeTasks + """

          - id: keys-hook
            title: Hang the keys on the hook by the door
            controller: {manifold: hang-hook.v2, latent_dims: 2}
            phrases: [hang up my keys, put my keys on the hook]
        """;

    /// <summary>Broken: an unknown key ("phrazes") on line 6.</summary>
    public const string Broken = """
        version: 1
        tasks:
          - id: hall-light
            title: Press the hall light switch
            controller: {manifold: reach-press.v1, latent_dims: 1}
            phrazes: [hall light]
        """;

    public TempRegistry(string yaml)
    {
        Directory = System.IO.Directory.CreateTempSubdirectory("taskphrase-hosting-").FullName;
        Path = System.IO.Path.Combine(Directory, "registry.yaml");
        File.WriteAllText(Path, yaml);
    }

    public string Directory { get; }

    public string Path { get; }

    /// <summary>Replaces the file atomically (write beside it, then rename over it).</summary>
    public void Replace(string yaml)
    {
        string temp = Path + ".tmp";
        File.WriteAllText(temp, yaml);
        File.Move(temp, Path, overwrite: true);
    }

    public void Dispose()
    {
        try { System.IO.Directory.Delete(Directory, recursive: true); }
        catch (IOException) { }
    }
}
