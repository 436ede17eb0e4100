using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Tests.Resolution.Scoring;

/// <summary>The parameters of a registry's <c>scoring</c> mapping reach the resolver and the index build.</summary>
[Collection(ModelCollection.Name)]
public class RegistryScoringParametersTests(ModelFixture fixture)
{
    // Harbor Street tasks (see the scenario), three approved wordings each.
    private static TaskRegistry Registry(string scoring) => RegistryLoader.Parse($$"""
        version: 1
        {{scoring}}
        tasks:
          - id: water-basil
            title: Water the basil
            controller: { manifold: pour-arc.v2, latent_dims: 2 }
            phrases: [water the basil, give the basil plant a drink, pour some water on the basil]
            must_reject: [throw the basil in the bin]
          - id: hall-light
            title: Press the hall light switch
            controller: { manifold: reach-press.v1, latent_dims: 1 }
            phrases: [turn on the hall light, press the hall light switch, switch the light in the hall on]
          - id: fish-food
            title: Feed the fish
            controller: { manifold: pinch-drop.v1, latent_dims: 1 }
            phrases: [feed the fish, give the fish their food, put fish food in the tank]
        """, "test.yaml");

    [Fact]
    public void Create_RegistryHeadParameters_TrainTheHeadWithThem()
    {
        var registry = Registry("scoring: {strategy: head, l2: 0.1, temperature: 2}");
        var head = TaskResolver.Create(registry, fixture.Embedder).Head!;
        Assert.Equal((0.1, 2.0), (head.L2, head.Temperature));
        // The same weights as a head trained directly with those settings on the same phrases.
        var direct = TaskResolver.Create(registry, fixture.Embedder,
            new ResolverOptions { Scoring = ScoringStrategy.Head, Learned = LearnedScoringOptions.Default with { L2 = 0.1, Temperature = 2 } }).Head!;
        Assert.Equal(direct.ToBytes(), head.ToBytes());
    }

    [Fact]
    public async Task Resolve_RegistryK_AveragesThatManyBestPhraseCosines()
    {
        // Independent check: the cosines of the utterance to the task's phrases (TensorPrimitives on the same model's
        // embeddings), sorted, the top k averaged.
        const string utterance = "please give the fish some food";
        string[] phrases = ["feed the fish", "give the fish their food", "put fish food in the tank"];
        var vectors = await fixture.Embedder.GenerateAsync([utterance, .. phrases]);
        var cosines = phrases.Select((_, i) => System.Numerics.Tensors.TensorPrimitives.CosineSimilarity(vectors[0].Vector.Span, vectors[i + 1].Vector.Span))
            .OrderDescending().ToArray();
        float Score(string scoring) => TaskResolver.Create(Registry(scoring), fixture.Embedder).Rank(utterance, 3).Single(c => c.TaskId == "fish-food").Score;
        Assert.Equal(cosines[0], Score("scoring: {strategy: top-k, k: 1}"), 4);
        Assert.Equal((cosines[0] + cosines[1]) / 2, Score("scoring: {strategy: top-k, k: 2}"), 4);
        Assert.Equal(cosines.Average(), Score("scoring: top-k"), 4); // the default k 3 covers all three phrases
    }

    [Fact]
    public void Resolve_RegistryCentroidWeight_MovesTheBlendBetweenBestPhraseAndCentroid()
    {
        const string utterance = "please give the fish some food";
        float Score(string scoring) => TaskResolver.Create(Registry(scoring), fixture.Embedder).Rank(utterance, 3).Single(c => c.TaskId == "fish-food").Score;
        float best = Score("scoring: best-phrase"), centroid = Score("scoring: centroid");
        Assert.Equal(best, Score("scoring: {strategy: blend, centroid_weight: 0}"), 5);
        Assert.Equal(centroid, Score("scoring: {strategy: blend, centroid_weight: 1}"), 5);
        Assert.Equal(0.25f * centroid + 0.75f * best, Score("scoring: {strategy: blend, centroid_weight: 0.25}"), 5);
        Assert.Equal(0.5f * (centroid + best), Score("scoring: blend"), 5);
    }

    [Fact]
    public void Create_ExplicitStrategy_KeepsTheOptionsK()
    {
        // An explicit ResolverOptions.Scoring keeps the options' own settings, not the registry's k.
        const string utterance = "please give the fish some food";
        var registry = Registry("scoring: {strategy: top-k, k: 1}");
        float fromRegistry = TaskResolver.Create(registry, fixture.Embedder).Rank(utterance, 3).Single(c => c.TaskId == "fish-food").Score;
        float explicitK3 = TaskResolver.Create(registry, fixture.Embedder, new ResolverOptions { Scoring = ScoringStrategy.TopK, TopK = 3 })
            .Rank(utterance, 3).Single(c => c.TaskId == "fish-food").Score;
        Assert.NotEqual(fromRegistry, explicitK3);
    }

    [Fact]
    public async Task Resolve_ProbabilityWeight_MovesTheScoreBetweenProbabilityAndCentroidCosine()
    {
        // α = 1: the score is the head's probability; α = 0: the cosine to the task centroid, exactly what the centroid
        // strategy scores; α = 0.5: their geometric mean.
        const string utterance = "please give the fish some food";
        var vector = (await fixture.Embedder.GenerateAsync([utterance]))[0].Vector.ToArray();
        var half = TaskResolver.Create(Registry("scoring: head"), fixture.Embedder);
        var p = new float[half.Head!.Classes];
        half.Head.Predict(vector, p, new float[half.Head.Dimensions]);
        float cos = TaskResolver.Create(Registry("scoring: centroid"), fixture.Embedder).Rank(utterance, 3).Single(c => c.TaskId == "fish-food").Score;
        float Score(string scoring) => TaskResolver.Create(Registry(scoring), fixture.Embedder).Rank(utterance, 3).Single(c => c.TaskId == "fish-food").Score;
        Assert.Equal(p[2], Score("scoring: {strategy: head, probability_weight: 1}"), 5);
        Assert.Equal(cos, Score("scoring: {strategy: head, probability_weight: 0}"), 5);
        Assert.Equal(Math.Pow(p[2], 0.75) * Math.Pow(cos, 0.25), Score("scoring: {strategy: head, probability_weight: 0.75}"), 5);
        Assert.Equal(MathF.Sqrt(p[2] * cos), half.Rank(utterance, 3).Single(c => c.TaskId == "fish-food").Score, 5);
    }

    [Fact]
    public void ToBytes_ProbabilityWeight_RoundTripsAndTheDefaultKeepsFormatVersionOne()
    {
        var head = TaskResolver.Create(Registry("scoring: head"), fixture.Embedder).Head!;
        byte[] plain = head.ToBytes();
        Assert.Equal(1, plain[4] | plain[5] << 8); // version 1 layout unchanged for the default weight
        var weighted = head.WithProbabilityWeight(0.25);
        byte[] bytes = weighted.ToBytes();
        Assert.Equal(2, bytes[4] | bytes[5] << 8);
        Assert.Equal(plain.Length + 8, bytes.Length);
        var back = TaskHead.FromBytes(bytes);
        Assert.Equal(0.25, back.ProbabilityWeight);
        Assert.Equal(bytes, back.ToBytes());
        Assert.Equal(TaskHead.DefaultProbabilityWeight, TaskHead.FromBytes(plain).ProbabilityWeight);
    }

    [Fact]
    public void Create_ExplicitStrategy_KeepsTheOptionsLearnedSettings()
    {
        var registry = Registry("scoring: {strategy: head, l2: 0.1}");
        var head = TaskResolver.Create(registry, fixture.Embedder, new ResolverOptions { Scoring = ScoringStrategy.Head }).Head!;
        Assert.Equal(LearnedScoringOptions.Default.L2, head.L2);
    }

    [Fact]
    public void Create_RegistryShrinkage_ChangesWhitenedScores()
    {
        var lw = TaskResolver.Create(Registry("scoring: whitened"), fixture.Embedder);
        var fixedShrinkage = TaskResolver.Create(Registry("scoring: {strategy: whitened, shrinkage: 0.9}"), fixture.Embedder);
        var direct = TaskResolver.Create(Registry("scoring: whitened"), fixture.Embedder,
            new ResolverOptions { Scoring = ScoringStrategy.Whitened, Learned = LearnedScoringOptions.Default with { Shrinkage = 0.9 } });
        const string utterance = "could you water my basil plant";
        Assert.Equal(direct.Rank(utterance)[0].Score, fixedShrinkage.Rank(utterance)[0].Score);
        Assert.NotEqual(lw.Rank(utterance)[0].Score, fixedShrinkage.Rank(utterance)[0].Score);
    }

    [Fact]
    public async Task Build_RegistryHeadParameters_StoredHeadUsesThem()
    {
        var registry = Registry("scoring: {strategy: head, l2: 0.01, temperature: 4}");
        string path = Path.Combine(Path.GetTempPath(), $"tp-{Guid.NewGuid():N}.tpi");
        try
        {
            var index = await TaskIndexBuilder.BuildAsync(path, registry, fixture.Embedder);
            var fromIndex = TaskResolver.FromIndex(index, fixture.Embedder).Head!;
            Assert.Equal(TaskResolver.Create(registry, fixture.Embedder).Head!.ToBytes(), fromIndex.ToBytes());
            Assert.Equal((0.01, 4.0), (fromIndex.L2, fromIndex.Temperature));
        }
        finally { File.Delete(path); }
    }
}
