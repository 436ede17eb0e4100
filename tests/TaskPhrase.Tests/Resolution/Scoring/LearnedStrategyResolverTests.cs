using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Tests.Resolution.Scoring;

[Collection(ModelCollection.Name)]
public class LearnedStrategyResolverTests(ModelFixture fixture)
{
    private static TaskDefinition Task(string id, string[] phrases, string[]? mustReject = null) => new()
    {
        Id = id,
        Title = id.Replace('-', ' '),
        Controller = new ControllerBinding(id + ".v1", 2),
        Phrases = phrases,
        MustReject = mustReject ?? [],
    };

    // Harbor Street tasks (see the scenario): three approved wordings each, one look-alike.
    private static TaskRegistry Flat(RegistrySettings? settings = null) => new(
    [
        Task("water-basil", ["water the basil", "give the basil plant a drink", "pour some water on the basil"], ["throw the basil in the bin"]),
        Task("hall-light", ["turn on the hall light", "press the hall light switch", "switch the light in the hall on"]),
        Task("fish-food", ["feed the fish", "give the fish their food", "put fish food in the tank"]),
        Task("remote-fetch", ["bring me the remote", "fetch the tv remote", "hand me the remote control"]),
    ], new RegistryDefaults(0.05f, 0.01f), "test-flat", settings: settings);

    [Theory]
    [InlineData(ScoringStrategy.Whitened)]
    [InlineData(ScoringStrategy.Head)]
    public void Resolve_Paraphrases_TopCandidateIsTheirTask(ScoringStrategy scoring)
    {
        var resolver = TaskResolver.Create(Flat(), fixture.Embedder, new ResolverOptions { Scoring = scoring });
        Assert.Equal(scoring, resolver.Scoring);
        foreach (var (utterance, task) in new[]
        {
            ("could you water my basil plant", "water-basil"),
            ("lights on in the hallway please", "hall-light"),
            ("time to feed the goldfish", "fish-food"),
            ("where is the tv remote, bring it", "remote-fetch"),
        })
            Assert.Equal(task, resolver.Rank(utterance)[0].TaskId);
    }

    [Theory]
    [InlineData("whitened", ScoringStrategy.Whitened)]
    [InlineData("head", ScoringStrategy.Head)]
    public void Create_RegistryScoringName_ChoosesStrategy(string name, ScoringStrategy expected)
        => Assert.Equal(expected, TaskResolver.Create(Flat(new RegistrySettings { Scoring = name }), fixture.Embedder).Scoring);

    [Fact]
    public void Create_UnknownScoringName_ListsTheNewNames()
    {
        var e = Assert.Throws<ArgumentException>(() => TaskResolver.Create(Flat(new RegistrySettings { Scoring = "heads" }), fixture.Embedder));
        Assert.Contains("whitened or head", e.Message);
    }

    [Fact]
    public void Resolve_MustRejectWordingUnderHead_IsLookAlike()
    {
        // Thresholds out of the way: the look-alike class takes the probability mass, so with the registry's accept
        // the same utterance is already refused as out of scope.
        var resolver = TaskResolver.Create(Flat(), fixture.Embedder,
            new ResolverOptions { Scoring = ScoringStrategy.Head, HazardCheck = false, AcceptOverride = 0, MarginOverride = 0 });
        Assert.True(resolver.Head!.HasRejectClass);
        var r = resolver.Resolve("throw the basil into the bin");
        Assert.Equal((ResolutionOutcome.Rejected, RejectionReason.LookAlike), (r.Outcome, r.Reason));
    }

    [Fact]
    public async Task Resolve_HeadScore_IsGeometricMeanOfProbabilityAndCentroidCosine()
    {
        var resolver = TaskResolver.Create(Flat(), fixture.Embedder, new ResolverOptions { Scoring = ScoringStrategy.Head });
        var centroid = TaskResolver.Create(Flat(), fixture.Embedder, new ResolverOptions { Scoring = ScoringStrategy.Centroid });
        const string utterance = "please give the fish some food";
        var head = resolver.Head!;
        var vector = (await fixture.Embedder.GenerateAsync([utterance]))[0].Vector.ToArray();
        var p = new float[head.Classes];
        head.Predict(vector, p, new float[head.Dimensions]);
        float cos = centroid.Rank(utterance, 4).Single(c => c.TaskId == "fish-food").Score;
        Assert.Equal(MathF.Sqrt(p[2] * cos), resolver.Rank(utterance, 4).Single(c => c.TaskId == "fish-food").Score, 5);
    }

    [Fact]
    public void Create_HeadOnSameRegistryTwice_ByteIdenticalHead()
    {
        var a = TaskResolver.Create(Flat(), fixture.Embedder, new ResolverOptions { Scoring = ScoringStrategy.Head }).Head!;
        var b = TaskResolver.Create(Flat(), fixture.Embedder, new ResolverOptions { Scoring = ScoringStrategy.Head }).Head!;
        Assert.Equal(a.ToBytes(), b.ToBytes());
    }

    [Fact]
    public void Options_LearnedNull_Throws()
        => Assert.Throws<ArgumentNullException>(() => new ResolverOptions { Learned = null! });
}
