using CsvHelper;
using System.Globalization;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// Golden resolutions for the Harbor Street example registry: hand-written expectations (outcome, task, reason) for
/// paraphrases, speech-recognition slips, nonsense, negations, hazards, look-alikes and untrained requests. None of
/// the utterances is an approved phrase. Invented scenario data (see examples/harbor-street/README.md).
/// </summary>
[Collection(ModelCollection.Name)]
public class GoldenResolutionTests(ModelFixture fixture)
{
    public static TheoryData<string, string, string, string, string> Rows()
    {
        var data = new TheoryData<string, string, string, string, string>();
        using var reader = new StreamReader(TestPaths.Data("golden", "harbor-street-golden.csv"));
        using var csv = new CsvReader(reader, CultureInfo.InvariantCulture);
        foreach (var r in csv.GetRecords<GoldenRow>()) data.Add(r.utterance, r.outcome, r.task, r.reason, r.note);
        return data;
    }

    private static readonly Lazy<TaskRegistry> Registry = new(() => RegistryLoader.Load(TestPaths.Example("harbor-street", "registry.yaml")));

    [Theory]
    [MemberData(nameof(Rows))]
    public void Resolve_GoldenUtterance_GivesExpectedDecision(string utterance, string outcome, string task, string reason, string note)
    {
        var resolver = Resolvers.GetOrAdd(fixture, f => TaskResolver.Create(Registry.Value, f.Embedder));
        var r = resolver.Resolve(utterance);
        string got = $"{ResolutionJson.Name(r.Outcome)} {(r.Outcome == ResolutionOutcome.Accepted ? r.Task?.Id : "")} {ResolutionJson.Name(r.Reason)}";
        Assert.True(outcome == ResolutionJson.Name(r.Outcome) && (task.Length == 0 || task == r.Task?.Id) && reason == (ResolutionJson.Name(r.Reason) ?? ""),
            $"[{note}] '{utterance}': expected {outcome} {task} {reason}, got {got} (score {r.Score:0.000}, margin {r.Margin:0.000}, nearest {r.Task?.Id}; {r.Detail})");
        Assert.DoesNotContain(Registry.Value.Tasks.SelectMany(t => t.Phrases), p => TaskPhrase.Text.TextNormalizer.MatchKey(p) == TaskPhrase.Text.TextNormalizer.MatchKey(utterance) && utterance.Length > 0);
    }

    private static readonly System.Collections.Concurrent.ConcurrentDictionary<ModelFixture, TaskResolver> Resolvers = new();

    private sealed record GoldenRow(string utterance, string outcome, string task, string reason, string note);
}
