namespace TaskPhrase.Tests.Registry;

/// <summary>Paths of the registry fixtures under tests/data/registries (copied to data/ in the test output).</summary>
internal static class RegistryFixtures
{
    public static string Root => Path.Combine(AppContext.BaseDirectory, "data", "registries");

    public static string Broken(string name) => Path.Combine(Root, "broken", name);

    public static string Valid(string name) => Path.Combine(Root, "valid", name);

    /// <summary>A minimal valid registry (two Harbor Street tasks) for tests that change one thing in it.</summary>
    public const string TwoTasks = """
        version: 1
        tasks:
          - id: hall-light
            title: Press the hall light switch
            controller:
              manifold: reach-press.v1
              latent_dims: 1
            phrases:
              - turn on the hall light
              - press the hall light switch
          - id: water-basil
            title: Water the basil on the kitchen windowsill
            controller:
              manifold: pour-arc.v2
              latent_dims: 2
            phrases:
              - water the basil
              - give the basil a drink
        """;
}
