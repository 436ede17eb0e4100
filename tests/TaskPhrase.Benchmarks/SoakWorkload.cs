using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// The resolver and utterance mix shared by the soak and concurrency runs: four Harbor Street tasks built in code,
/// exact-match utterances (approved phrases written four ways: no model call) and model-path utterances
/// (paraphrases, out-of-scope, negated and hazardous commands).
/// </summary>
public static class SoakWorkload
{
    public const string Yaml = """
        version: 1
        tasks:
          - id: hall-light
            title: Press the hall light switch
            controller: { manifold: reach-press.v1, latent_dims: 1 }
            phrases: [press the hall light switch, turn on the hall light, switch the hall light on]
          - id: water-basil
            title: Water the basil on the kitchen windowsill
            controller: { manifold: pour-arc.v2, latent_dims: 2 }
            phrases: [water the basil, give the basil a drink, pour some water on the basil]
            must_reject: [throw the basil away]
          - id: kettle-pour
            title: Pour hot water from the kettle into the teapot
            confirm: true
            controller: { manifold: pour-arc.v2, latent_dims: 2 }
            phrases: [pour the kettle into the teapot, fill the teapot from the kettle]
            must_reject: [pour the kettle on me]
          - id: fish-food
            title: Feed the fish
            controller: { manifold: pinch-shake.v1, latent_dims: 1 }
            phrases: [feed the fish, give the fish some food]
        """;

    public static TaskRegistry Registry() => RegistryLoader.Parse(Yaml, "soak.yaml");

    public static IReadOnlyList<string> Exact { get; } = Registry().Tasks.SelectMany(t => t.Phrases)
        .SelectMany(p => new[] { p, p.ToUpperInvariant(), "  " + p + "!", p.Replace(" ", "  \u200B", StringComparison.Ordinal) }).ToArray();

    public static IReadOnlyList<string> ModelPath { get; } =
    [
        "could you water my basil plant", "please switch on the light in the hallway", "the fish are hungry",
        "what is the weather tomorrow", "don't feed the fish", "pour the kettle over my hand", "water the fish",
        "turn the tv to channel four", "\U0001F33F\U0001F4A7", "<script>alert(1)</script>",
    ];

    /// <summary>The i-th utterance: every <paramref name="modelEvery"/>th goes through the model, the rest are exact matches.</summary>
    public static string Utterance(long i, int modelEvery)
        => i % modelEvery == 0 ? ModelPath[(int)(i / modelEvery % ModelPath.Count)] : Exact[(int)(i % Exact.Count)];

    /// <summary>A resolution without its timing, for comparing runs.</summary>
    public static string Fingerprint(TaskPhrase.Resolution.Resolution r) => ResolutionJson.ToJson(r with { Elapsed = TimeSpan.Zero });
}
