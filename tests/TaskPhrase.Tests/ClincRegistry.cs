using TaskPhrase.Registry;

namespace TaskPhrase.Tests;

/// <summary>Builds a registry from the first k training queries of each CLINC150 intent (Larson et al., 2019).</summary>
public static class ClincRegistry
{
    public static TaskRegistry Build(int perIntent, RegistryDefaults? defaults = null)
    {
        var seen = new HashSet<string>(StringComparer.Ordinal);
        var tasks = Clinc150.Split("train")
            .GroupBy(r => r.Intent)
            .Select(g => new TaskDefinition
            {
                Id = g.Key.Replace('_', '-'),
                Title = g.Key.Replace('_', ' '),
                Controller = new ControllerBinding("none", 1),
                Phrases = g.Select(r => r.Text).Where(t => seen.Add(TaskPhrase.Text.TextNormalizer.MatchKey(t))).Take(perIntent).ToArray(),
            })
            .ToArray();
        return new TaskRegistry(tasks, defaults ?? RegistryDefaults.Standard, $"clinc150-k{perIntent}");
    }

    public static string TaskIdOf(string intent) => intent == "oos" ? TaskPhrase.Evaluation.ProbeCase.Reject : intent.Replace('_', '-');
}
