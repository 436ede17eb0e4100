using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Tests.TestDoubles;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>
/// The joint search of scoring setting and thresholds (<see cref="ScoringSearch"/>). Every chosen rule is checked
/// independently: the tuned registry is written, read back and run by a fresh resolver without the search's cache,
/// and its accept decisions are counted here.
/// </summary>
[Collection(ModelCollection.Name)]
public class ScoringSearchTests(ModelFixture fixture)
{
    private static readonly DateTimeOffset When = new(2026, 12, 1, 0, 0, 0, TimeSpan.Zero);

    /// <summary>Writes the tuned copy of <paramref name="yaml"/> and reads it back.</summary>
    private static (TaskRegistry Registry, string Text) Tuned(string yaml, ScoringSearchResult search)
    {
        var writer = new StringWriter();
        string comment = TunedRegistryWriter.BuildProvenanceComment(search.Result, "suite.csv", new string('0', 64), When, search.Outcomes);
        TunedRegistryWriter.Write(yaml, search.Result, comment, writer);
        return (RegistryLoader.Parse(writer.ToString(), "tuned.yaml"), writer.ToString());
    }

    /// <summary>Correct, wrong-task and false accepts of a resolver on a suite, counted from its outcomes.</summary>
    private static (int Correct, int Wrong, int FalseAccept, int InScope, int OutOfScope) Count(TaskResolver resolver, IReadOnlyList<ProbeCase> cases)
    {
        var resolutions = resolver.ResolveMany(cases.Select(c => c.Utterance).ToList());
        int correct = 0, wrong = 0, fa = 0, inScope = 0, oos = 0;
        for (int i = 0; i < cases.Count; i++)
        {
            bool accepted = resolutions[i].Outcome == ResolutionOutcome.Accepted;
            if (cases[i].IsInScope)
            {
                inScope++;
                if (accepted && resolutions[i].Task!.Id == cases[i].Expect) correct++;
                else if (accepted) wrong++;
            }
            else
            {
                oos++;
                if (accepted) fa++;
            }
        }
        return (correct, wrong, fa, inScope, oos);
    }

    [Fact]
    public void Run_HarborStreet_ChosenRuleMeetsBothBudgetsWhenRecomputed()
    {
        // The example registry and its tuning suite; budgets as in the README's strict operating point.
        string yaml = File.ReadAllText(TestPaths.Example("harbor-street", "registry.yaml"));
        var registry = RegistryLoader.Parse(yaml, "registry.yaml");
        var cases = ProbeSuite.Load(TestPaths.Example("harbor-street", "probes.csv")).Cases;
        var budgets = new TuningBudgets(0.05, 0.0);

        var search = ScoringSearch.Run(registry, fixture.Embedder, cases, budgets, ScoringCandidate.DefaultGrid());

        Assert.True(search.Result.Feasible);
        Assert.Equal(39, search.Outcomes.Count);
        Assert.Equal(search.Chosen, search.Result.Scoring);
        // The winner has the most correct acceptances among the feasible settings, at least the centroid's.
        int best = search.Outcomes.Where(o => o.Result.Feasible).Max(o => o.Result.Metrics.InScopeAccuracy.Count);
        Assert.Equal(best, search.Result.Metrics.InScopeAccuracy.Count);
        Assert.True(best >= search.Outcomes.Single(o => o.Candidate.Strategy == "centroid").Result.Metrics.InScopeAccuracy.Count);

        var (tuned, text) = Tuned(yaml, search);
        Assert.Equal(search.Chosen.Strategy, tuned.Settings.Scoring);
        Assert.Equal(search.Chosen.Parameters, tuned.Settings.ScoringParameters);
        Assert.Contains($"Scoring: {search.Chosen.Label}, the best of 39 settings", text);
        var (correct, wrong, fa, inScope, oos) = Count(TaskResolver.Create(tuned, fixture.Embedder), cases);
        Assert.True(fa <= 0.05 * oos, $"{fa} of {oos} out-of-scope probes accepted");
        Assert.Equal(0, wrong);
        Assert.Equal(search.Result.Metrics.InScopeAccuracy.Count, correct);
        Assert.Equal(search.Result.Metrics.FalseAcceptRate.Count, fa);
        Assert.Equal(search.Result.Metrics.InScope, inScope);
    }

    [Fact]
    public void Run_SameInputsTwice_SameChoiceAndFigures()
    {
        string yaml = File.ReadAllText(TestPaths.Example("harbor-street", "registry.yaml"));
        var registry = RegistryLoader.Parse(yaml, "registry.yaml");
        var cases = ProbeSuite.Load(TestPaths.Example("harbor-street", "probes.csv")).Cases;
        var grid = ScoringCandidate.DefaultGrid(["centroid", "whitened", "head"]);
        var a = ScoringSearch.Run(registry, fixture.Embedder, cases, new TuningBudgets(0.05, 0.0), grid);
        var b = ScoringSearch.Run(registry, fixture.Embedder, cases, new TuningBudgets(0.05, 0.0), grid);
        Assert.Equal(a.Chosen, b.Chosen);
        Assert.Equal(
            a.Outcomes.Select(o => (o.Candidate, o.Result.Accept, o.Result.Margin, o.Result.Metrics.InScopeAccuracy.Count, o.Result.Metrics.FalseAcceptRate.Count)),
            b.Outcomes.Select(o => (o.Candidate, o.Result.Accept, o.Result.Margin, o.Result.Metrics.InScopeAccuracy.Count, o.Result.Metrics.FalseAcceptRate.Count)));
        Assert.Equal(Tuned(yaml, a).Text, Tuned(yaml, b).Text);
    }

    // A hand-made geometry (vectors chosen here, not by a model) where the centroid cannot separate: task cup-fetch has two
    // unrelated wordings, so its centroid lies between them, exactly where the out-of-scope requests are; the best
    // phrase separates them cleanly.
    private const string TwoClusterYaml = """
        version: 1
        defaults: { accept: 0.5, margin: 0.01 }
        tasks:
          - id: cup-fetch
            title: Fetch the cup
            controller: { manifold: reach-grasp.v1, latent_dims: 2 }
            phrases: [fetch the red cup, bring the blue mug]
          - id: door-open
            title: Open the door
            controller: { manifold: push-open.v1, latent_dims: 1 }
            phrases: [open the front door, pull the door open]
        """;

    private static ScriptedEmbeddingGenerator TwoClusterEmbeddings(params (string, float[])[] extra)
    {
        static float[] V(params float[] x) => x;
        var vectors = new Dictionary<string, float[]>
        {
            ["fetch the red cup"] = V(1, 0, 0, 0, 0, 0),
            ["bring the blue mug"] = V(0, 1, 0, 0, 0, 0),
            ["open the front door"] = V(0, 0, 1, 0, 0, 0),
            ["pull the door open"] = V(0, 0, 1, 0, 0.2f, 0),
            ["fetch my red cup"] = V(1, 0, 0, 0, 0, 0.2f),
            ["pass the red cup"] = V(1, 0, 0, 0, 0.1f, 0),
            ["bring me the blue mug"] = V(0, 1, 0, 0, 0, 0.2f),
            ["carry over the blue mug"] = V(0, 1, 0, 0.1f, 0, 0),
            ["please open the door"] = V(0, 0, 1, 0, 0, 0.1f),
            ["open the door now"] = V(0, 0, 1, 0.1f, 0, 0),
            ["sing a quiet song"] = V(1, 1, 0, 0.05f, 0, 0),
            ["tell a short story"] = V(1, 1, 0, 0, 0, 0.1f),
        };
        foreach (var (text, v) in extra) vectors[text] = v;
        return new ScriptedEmbeddingGenerator(vectors);
    }

    private static readonly ProbeCase[] TwoClusterSuite =
    [
        new("fetch my red cup", "cup-fetch"), new("pass the red cup", "cup-fetch"),
        new("bring me the blue mug", "cup-fetch"), new("carry over the blue mug", "cup-fetch"),
        new("please open the door", "door-open"), new("open the door now", "door-open"),
        new("sing a quiet song", ProbeCase.Reject), new("tell a short story", ProbeCase.Reject),
    ];

    [Fact]
    public void Run_CentroidBetweenTwoWordings_NonDefaultStrategyWins()
    {
        var generator = TwoClusterEmbeddings();
        var registry = RegistryLoader.Parse(TwoClusterYaml, "two-cluster.yaml");
        var search = ScoringSearch.Run(registry, generator, TwoClusterSuite, new TuningBudgets(0.0, 0.0), ScoringCandidate.DefaultGrid());

        var centroid = search.Outcomes.Single(o => o.Candidate.Strategy == "centroid").Result;
        Assert.Equal(new ScoringCandidate("best-phrase"), search.Chosen);
        Assert.True(search.Result.Feasible);
        Assert.Equal(6, search.Result.Metrics.InScopeAccuracy.Count);
        Assert.True(centroid.Metrics.InScopeAccuracy.Count < 6, $"centroid reached {centroid.Metrics.InScopeAccuracy.Count} of 6");

        var (tuned, _) = Tuned(TwoClusterYaml, search);
        Assert.Equal("best-phrase", tuned.Settings.Scoring);
        var (correct, wrong, fa, _, _) = Count(TaskResolver.Create(tuned, generator), TwoClusterSuite);
        Assert.Equal((6, 0, 0), (correct, wrong, fa));
    }

    [Fact]
    public void Run_OutOfScopeProbeIsAnApprovedPhrase_InfeasibleWithTheSmallestViolation()
    {
        // An exact match is accepted whatever the thresholds, so a zero false-accept budget cannot be met.
        var generator = TwoClusterEmbeddings();
        var registry = RegistryLoader.Parse(TwoClusterYaml, "two-cluster.yaml");
        ProbeCase[] suite = [.. TwoClusterSuite, new("fetch the red cup", ProbeCase.Reject)];
        var search = ScoringSearch.Run(registry, generator, suite, new TuningBudgets(0.0, 0.0), ScoringCandidate.DefaultGrid(["centroid", "best-phrase", "blend"]));

        Assert.All(search.Outcomes, o => Assert.False(o.Result.Feasible));
        Assert.False(search.Result.Feasible);
        Assert.Equal(search.Outcomes.Min(o => o.Result.Violation), search.Result.Violation);
        // Among the settings with that violation, the one accepting the most in-scope probes correctly.
        Assert.Equal(new ScoringCandidate("best-phrase"), search.Chosen);
        Assert.Equal(1, search.Result.Metrics.FalseAcceptRate.Count);
    }

    [Fact]
    public void DefaultGrid_UnknownStrategy_NamesTheKnownOnes()
    {
        var e = Assert.Throws<ArgumentException>(() => ScoringCandidate.DefaultGrid(["centroid", "heads"]));
        Assert.Contains("'heads' is not a scoring strategy", e.Message);
        Assert.Equal(["head"], ScoringCandidate.DefaultGrid(["head"]).Select(c => c.Strategy).Distinct());
        Assert.Equal(27, ScoringCandidate.DefaultGrid(["head"]).Count);
    }
}
