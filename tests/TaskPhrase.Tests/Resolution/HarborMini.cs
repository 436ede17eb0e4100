using TaskPhrase.Registry;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// A small Harbor Street registry built in code (four of Noor's tasks) for the reliability tests, and the utterance
/// mixes they use: exact approved phrases (no model call) and a few paraphrases, refusals and guard cases that go
/// through the model.
/// </summary>
internal static class HarborMini
{
    public const string Yaml = """
        version: 1
        defaults:
          accept: 0.60
          margin: 0.04
        tasks:
          - id: hall-light
            title: Press the hall light switch
            controller:
              manifold: reach-press.v1
              latent_dims: 1
            phrases:
              - press the hall light switch
              - turn on the hall light
              - switch the hall light on
          - id: water-basil
            title: Water the basil on the kitchen windowsill
            controller:
              manifold: pour-arc.v2
              latent_dims: 2
            phrases:
              - water the basil
              - give the basil a drink
              - pour some water on the basil
            must_reject:
              - throw the basil away
          - id: kettle-pour
            title: Pour hot water from the kettle into the teapot
            confirm: true
            controller:
              manifold: pour-arc.v2
              latent_dims: 2
            phrases:
              - pour the kettle into the teapot
              - fill the teapot from the kettle
            must_reject:
              - pour the kettle on me
          - id: fish-food
            title: Feed the fish
            controller:
              manifold: pinch-shake.v1
              latent_dims: 1
            phrases:
              - feed the fish
              - give the fish some food
        """;

    public static TaskRegistry Registry() => RegistryLoader.Parse(Yaml, "harbor-mini.yaml");

    public static IReadOnlyList<string> Phrases { get; } = Registry().Tasks.SelectMany(t => t.Phrases).ToArray();

    /// <summary>Approved phrases written differently (case, spacing, punctuation): exact matches, no model call.</summary>
    public static IReadOnlyList<string> ExactVariants { get; } =
        Phrases.SelectMany(p => new[] { p, p.ToUpperInvariant(), "  " + p + "!", p.Replace(" ", "  \u200B", StringComparison.Ordinal) }).ToArray();

    /// <summary>Utterances that go through the model: paraphrases, out-of-scope, negated, hazardous and ambiguous-looking text.</summary>
    public static IReadOnlyList<string> ModelPath { get; } =
    [
        "could you water my basil plant",
        "please switch on the light in the hallway",
        "the fish are hungry",
        "what is the weather tomorrow",
        "don't feed the fish",
        "pour the kettle over my hand",
        "water the fish",
        "turn the tv to channel four",
    ];
}
