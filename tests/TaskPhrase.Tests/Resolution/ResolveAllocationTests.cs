using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// Managed allocation of one resolve on the calling thread (counted by the runtime,
/// <see cref="GC.GetAllocatedBytesForCurrentThread"/>; a byte count, not a timing) stays within the project's budget
/// of 1 KB on the model path (also with a typing slip corrected) and the exact-match path, for the default and the learned strategies. The result itself
/// (resolution, candidates) is most of it. The benchmark harness reports the same figure; this guards it.
/// </summary>
[Collection(ModelCollection.Name)]
public class ResolveAllocationTests(ModelFixture fixture)
{
    private const long Budget = 1024;

    private static readonly Lazy<TaskRegistry> Registry = new(() => RegistryLoader.Load(TestPaths.Example("harbor-street", "registry.yaml")));

    [Theory]
    [InlineData(ScoringStrategy.Centroid, "please could you water the basil on the windowsill", false)]
    [InlineData(ScoringStrategy.BestPhrase, "please could you water the basil on the windowsill", false)]
    [InlineData(ScoringStrategy.TopK, "please could you water the basil on the windowsill", false)]
    [InlineData(ScoringStrategy.Whitened, "please could you water the basil on the windowsill", false)]
    [InlineData(ScoringStrategy.Head, "please could you water the basil on the windowsill", false)]
    [InlineData(ScoringStrategy.Centroid, "there are letters on the mat can you get them", false)]
    [InlineData(ScoringStrategy.Centroid, "water the bazil", false)]
    [InlineData(ScoringStrategy.Centroid, "water the basil", true)]
    [InlineData(ScoringStrategy.Centroid, "  Water the BASIL. ", true)]
    public void Resolve_AcceptedCommand_AllocatesWithinBudget(ScoringStrategy strategy, string utterance, bool exact)
    {
        var resolver = TaskResolver.Create(Registry.Value, fixture.Embedder, new ResolverOptions { Scoring = strategy });
        var first = resolver.Resolve(utterance);
        Assert.Equal(ResolutionOutcome.Accepted, first.Outcome);
        Assert.Equal(exact, first.ExactMatch);
        for (int i = 0; i < 30; i++) resolver.Resolve(utterance);

        const int calls = 20;
        long before = GC.GetAllocatedBytesForCurrentThread();
        for (int i = 0; i < calls; i++) resolver.Resolve(utterance);
        long perCall = (GC.GetAllocatedBytesForCurrentThread() - before) / calls;
        Assert.True(perCall <= Budget, $"{strategy} \"{utterance}\": {perCall} B per resolve, budget {Budget} B");
    }
}
