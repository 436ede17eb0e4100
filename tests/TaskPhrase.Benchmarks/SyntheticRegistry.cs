using System.Globalization;
using System.Text;
using TaskPhrase.Registry;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// Generated registries of a chosen size, for benchmarks that need more phrases than the example has.
/// <see cref="Yaml"/> writes a valid registry file (loaded and validated like any other); phrases read like
/// Harbor Street commands, 6–13 word pieces long, one object per task.
/// </summary>
internal static class SyntheticRegistry
{
    private static readonly string[] Objects =
    [
        "basil", "kettle", "blanket", "remote", "phone", "keys", "mail", "window", "pill box", "fish food", "book", "cup",
        "glasses", "towel", "bottle", "radio", "plate", "spoon", "jumper", "scarf", "slippers", "notebook", "tablet", "charger",
        "curtain", "fan", "heater", "lamp", "pillow", "bag",
    ];

    private static readonly string[] Places =
    [
        "on the table", "by the door", "from the shelf", "in the kitchen", "on the windowsill", "by the bed", "on the sofa",
        "in the hall", "on the desk", "by the chair",
    ];

    private static readonly string[] Templates =
    [
        "bring me the {0}", "could you fetch the {0} {1}", "get the {0} {1} please", "i'd like the {0} now", "pass me the {0}",
        "can you reach the {0} {1}", "the {0} {1}", "hand me my {0}", "grab the {0} for me", "would you move the {0} {1}",
        "pick up the {0} {1}", "put the {0} back {1}",
    ];

    /// <summary>YAML of a registry with <paramref name="tasks"/> tasks of <paramref name="phrasesPerTask"/> phrases (at most 12).</summary>
    public static string Yaml(int tasks, int phrasesPerTask)
    {
        ArgumentOutOfRangeException.ThrowIfGreaterThan(phrasesPerTask, Templates.Length);
        var sb = new StringBuilder("version: 1\ndefaults:\n  accept: 0.60\n  margin: 0.04\ntasks:\n");
        for (int t = 0; t < tasks; t++)
        {
            string obj = Object(t), place = Places[t % Places.Length];
            sb.Append(CultureInfo.InvariantCulture, $"  - id: task-{t:D5}\n    title: Handle the {obj}\n    controller: {{manifold: reach-grasp.v1, latent_dims: 2}}\n    phrases:\n");
            for (int p = 0; p < phrasesPerTask; p++)
                sb.Append("      - ").Append(string.Format(CultureInfo.InvariantCulture, Templates[p], obj, place)).Append('\n');
        }
        return sb.ToString();
    }

    /// <summary>A validated registry (through <see cref="RegistryLoader"/>).</summary>
    public static TaskRegistry Load(int tasks, int phrasesPerTask)
        => RegistryLoader.Parse(Yaml(tasks, phrasesPerTask), $"synthetic-{tasks}x{phrasesPerTask}.yaml",
            new RegistryLoadOptions { MaxTasks = Math.Max(tasks, 1000), MaxPhrases = Math.Max(tasks * phrasesPerTask, 10_000) });

    /// <summary>
    /// A registry built directly (no loader), for sizes the loader's limits or speed do not suit: phrase texts are
    /// unique placeholders, since only their embeddings matter to the search.
    /// </summary>
    public static TaskRegistry Direct(int tasks, int phrasesPerTask)
    {
        var list = new TaskDefinition[tasks];
        for (int t = 0; t < tasks; t++)
        {
            var phrases = new string[phrasesPerTask];
            for (int p = 0; p < phrasesPerTask; p++) phrases[p] = $"wording {p} of {Object(t)} task {t}";
            list[t] = new TaskDefinition
            {
                Id = $"task-{t:D6}",
                Title = $"Handle the {Object(t)}",
                Controller = new ControllerBinding("reach-grasp.v1", 2),
                Phrases = phrases,
            };
        }
        return new TaskRegistry(list, RegistryDefaults.Standard, $"synthetic-{tasks}x{phrasesPerTask}");
    }

    /// <summary>Object of task <paramref name="t"/>: a plain object word for the first tasks, then numbered ("cup 31").</summary>
    private static string Object(int t)
        => t < Objects.Length ? Objects[t] : $"{Objects[t % Objects.Length]} {t / Objects.Length + 1}";
}
