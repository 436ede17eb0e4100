using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Tests.TestDoubles;

namespace TaskPhrase.Tests.Resolution;

[Collection(ModelCollection.Name)]
public class TaskResolverTests(ModelFixture fixture)
{
    private static TaskDefinition Task(string id, string[] phrases, string[]? mustReject = null, bool confirm = false) => new()
    {
        Id = id,
        Title = id.Replace('-', ' '),
        Confirm = confirm,
        Controller = new ControllerBinding(id + ".v1", 2),
        Phrases = phrases,
        MustReject = mustReject ?? [],
    };

    private static TaskRegistry Kitchen(float accept = 0.5f, float margin = 0.04f) => new(
    [
        Task("water-basil", ["water the basil", "give the basil plant a drink", "pour some water on the basil"], ["pour the hot water on the basil"]),
        Task("kettle-pour", ["pour hot water from the kettle into the teapot", "fill the teapot from the kettle", "make the tea with the kettle"], confirm: true),
        Task("hall-light", ["turn on the hall light", "press the hall light switch", "hall light please"]),
    ], new RegistryDefaults(accept, margin), "test-kitchen");

    private TaskResolver Resolver(TaskRegistry? registry = null, ResolverOptions? options = null)
        => TaskResolver.Create(registry ?? Kitchen(), fixture.Embedder, options);

    [Fact]
    public void Resolve_QuickstartSentencesAsPhrases_ScoresMatchPublishedMatrix()
    {
        // sentence-transformers Quickstart (all-MiniLM-L6-v2): sim("The weather is lovely today.", "It's so sunny outside!")
        // = 0.6660 and sim("It's so sunny outside!", "He drove to the stadium.") = 0.1411.
        var registry = new TaskRegistry(
            [Task("weather", ["The weather is lovely today."]), Task("stadium", ["He drove to the stadium."])],
            RegistryDefaults.Standard, "quickstart");
        var r = Resolver(registry).Resolve("It's so sunny outside!");
        Assert.Equal(0.6660, r.Candidates.Single(c => c.TaskId == "weather").Score, 5e-4);
        Assert.Equal(0.1411, r.Candidates.Single(c => c.TaskId == "stadium").Score, 5e-4);
        Assert.Equal(0.6660, r.Score!.Value, 5e-4);
    }

    [Fact]
    public void Resolve_ExactPhrase_AcceptsWithoutModelCall()
    {
        var counting = new CountingEmbeddingGenerator(fixture.Embedder);
        var resolver = TaskResolver.Create(Kitchen(), counting);
        int before = counting.TextsEmbedded;
        var r = resolver.Resolve("  Water the BASIL. ");
        Assert.Equal(before, counting.TextsEmbedded);
        Assert.Equal(ResolutionOutcome.Accepted, r.Outcome);
        Assert.True(r.ExactMatch);
        Assert.Equal(1f, r.Score);
        Assert.Equal("water the basil", r.Phrase);
    }

    [Theory]
    [InlineData("")]
    [InlineData("   \t ")]
    [InlineData("\u200B\u200D")]
    public void Resolve_NothingAfterNormalisation_IsEmpty(string input)
    {
        var r = Resolver().Resolve(input);
        Assert.Equal((ResolutionOutcome.Rejected, RejectionReason.Empty), (r.Outcome, r.Reason));
        Assert.Null(r.Score);
    }

    [Theory]
    [InlineData("sdfkjh qwpoeiru zxmcnv")]
    [InlineData("?!?! ...")]
    [InlineData("\U0001F642\U0001F642\U0001F642")]
    [InlineData("florp wibbin snazzlequank")]
    public void Resolve_Nonsense_IsUnintelligible(string input)
        => Assert.Equal(RejectionReason.Unintelligible, Resolver().Resolve(input).Reason);

    [Theory]
    [InlineData("don't water the basil", "don't")]
    [InlineData("do not turn on the hall light", "do not")]
    [InlineData("never water the basil again", "never")]
    public void Resolve_NegatedCommand_IsNegated(string input, string cue)
    {
        var r = Resolver().Resolve(input);
        Assert.Equal((ResolutionOutcome.Rejected, RejectionReason.Negated), (r.Outcome, r.Reason));
        Assert.Equal(cue, r.NegationCue);
    }

    [Theory]
    [InlineData("throw the basil plant", "throw")]
    [InlineData("smash the hall light", "smash")]
    public void Resolve_HarmfulActionOnTaskObject_IsHazard(string input, string word)
    {
        var r = Resolver().Resolve(input);
        Assert.Equal(RejectionReason.Hazard, r.Reason);
        Assert.Equal(word, r.HazardWord);
        Assert.Contains(word, r.UncoveredWords);
    }

    [Fact]
    public void Resolve_CloserToMustReject_IsLookAlike()
    {
        var r = Resolver().Resolve("pour the hot water over the basil");
        Assert.Equal(RejectionReason.LookAlike, r.Reason);
        Assert.Contains("pour the hot water on the basil", r.Detail);
    }

    [Fact]
    public void Resolve_Paraphrase_IsAcceptedWithController()
    {
        var r = Resolver().Resolve("could you water my basil please");
        Assert.Equal(ResolutionOutcome.Accepted, r.Outcome);
        Assert.Equal("water-basil", r.Task!.Id);
        Assert.Equal("water-basil.v1", r.Task.Controller.Manifold);
        Assert.False(r.Confirm);
        Assert.Equal(RejectionReason.None, r.Reason);
    }

    [Fact]
    public void Resolve_ConfirmTask_CarriesConfirm()
    {
        var r = Resolver().Resolve("fill up the teapot using the kettle");
        Assert.Equal("kettle-pour", r.Task!.Id);
        Assert.Equal(ResolutionOutcome.Accepted, r.Outcome);
        Assert.True(r.Confirm);
    }

    [Fact]
    public void Resolve_Unrelated_IsOutOfScopeWithScore()
    {
        var r = Resolver().Resolve("what is the capital of peru");
        Assert.Equal(RejectionReason.OutOfScope, r.Reason);
        Assert.NotNull(r.Score);
        Assert.True(r.Score < 0.5f);
    }

    [Fact]
    public void Resolve_TwoTasksWithinMargin_IsAmbiguousWithBothCandidates()
    {
        var registry = new TaskRegistry(
            [Task("phone-fetch", ["bring me the phone"]), Task("remote-fetch", ["bring me the remote"])],
            new RegistryDefaults(0.3f, 0.2f), "ambiguous");
        var r = Resolver(registry).Resolve("bring it to me");
        Assert.Equal((ResolutionOutcome.Ambiguous, RejectionReason.Ambiguous), (r.Outcome, r.Reason));
        Assert.Equal(["phone-fetch", "remote-fetch"], r.Candidates.Select(c => c.TaskId).Order());
    }

    [Fact]
    public void Resolve_VeryLongInput_IsTruncatedAndFlagged()
    {
        var r = Resolver().Resolve("water the basil " + new string('x', 20_000));
        Assert.True(r.Truncated);
        Assert.True(r.Normalized.Length <= new ResolverOptions().MaxInputChars);
    }

    [Fact]
    public void Resolve_Null_ThrowsNamingParameter()
        => Assert.Equal("utterance", Assert.Throws<ArgumentNullException>(() => Resolver().Resolve(null!)).ParamName);

    [Fact]
    public void ResolveMany_SameAsOneAtATime()
    {
        string[] inputs = ["water the basil", "could you water my basil please", "don't water the basil", "", "sdfkjh qwpoeiru", "what is the capital of peru", "hall light please"];
        var resolver = Resolver();
        var batch = resolver.ResolveMany(inputs);
        for (int i = 0; i < inputs.Length; i++)
        {
            var single = resolver.Resolve(inputs[i]);
            Assert.Equal((single.Outcome, single.Reason, single.Task?.Id), (batch[i].Outcome, batch[i].Reason, batch[i].Task?.Id));
            Assert.Equal(single.Score ?? 0, batch[i].Score ?? 0, 1e-5);
        }
    }

    [Fact]
    public void Rank_ReturnsAllTasksBestFirstWithoutDecision()
    {
        var ranked = Resolver().Rank("don't water the basil", 3);
        Assert.Equal(3, ranked.Count);
        Assert.Equal("water-basil", ranked[0].TaskId);
        Assert.True(ranked[0].Score >= ranked[1].Score && ranked[1].Score >= ranked[2].Score);
    }

    [Fact]
    public void Resolve_ManyThreads_EqualSequentialResults()
    {
        string[] inputs = ["could you water my basil please", "turn the hallway light on", "what is the capital of peru", "don't water the basil", "fill up the teapot using the kettle"];
        var resolver = Resolver();
        var expected = inputs.Select(i => resolver.Resolve(i)).Select(r => (r.Outcome, r.Reason, r.Task?.Id, r.Score)).ToArray();
        Parallel.For(0, 200, new ParallelOptions { MaxDegreeOfParallelism = 8 }, k =>
        {
            var r = resolver.Resolve(inputs[k % inputs.Length]);
            Assert.Equal(expected[k % inputs.Length], (r.Outcome, r.Reason, r.Task?.Id, r.Score));
        });
    }

    [Fact]
    public async Task Reload_DuringResolves_SwapsAtomically()
    {
        var resolver = Resolver();
        var other = new TaskRegistry([Task("page-turn", ["turn the page", "next page please"])], new RegistryDefaults(0.5f, 0.04f), "other");
        var hashes = new System.Collections.Concurrent.ConcurrentBag<string>();
        var worker = System.Threading.Tasks.Task.Run(() =>
        {
            for (int i = 0; i < 100; i++)
            {
                var r = resolver.Resolve("turn the page of my book");
                // Each resolution is consistent with exactly one registry.
                Assert.Equal(r.RegistryHash == "other", r.Candidates.All(c => c.TaskId == "page-turn"));
                hashes.Add(r.RegistryHash);
            }
        });
        resolver.Reload(other);
        await worker;
        Assert.Equal("other", resolver.Resolve("turn the page of my book").RegistryHash);
        Assert.Equal("page-turn", resolver.Registry.Tasks.Single().Id);
    }
}
