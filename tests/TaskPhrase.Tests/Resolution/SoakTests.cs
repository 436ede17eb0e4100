using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// A short soak: 20,000 resolves on one resolver (99 % exact matches, 1 % model path: the mix of
/// <see cref="ConcurrencyTests.Utterance"/> with one model call in 100) must not grow the managed heap by more than
/// 4 MiB between the end of a 2,000-resolve warm-up and the end (GC.GetTotalMemory after a full collection). The
/// 1,000,000-resolve soak with native memory figures is <c>dotnet run -c Release --project tests/TaskPhrase.Benchmarks -- soak 1000000</c>.
/// </summary>
[Collection(SoakCollection.Name)]
public class SoakTests(ModelFixture fixture)
{
    private const int WarmUp = 2_000;
    private const int Resolves = 20_000;
    private const long MaxGrowthBytes = 4L * 1024 * 1024;

    [Fact]
    public void Resolve_TwentyThousandTimes_ManagedHeapStaysBounded()
    {
        var resolver = TaskResolver.Create(HarborMini.Registry(), fixture.Embedder);
        int accepted = 0;
        void Run(int from, int to)
        {
            for (int i = from; i < to; i++)
            {
                // Thread index 1 of the concurrency mix, but with one model call in 100 instead of 50.
                string u = i % 100 == 1 ? HarborMini.ModelPath[i / 100 % HarborMini.ModelPath.Count] : HarborMini.ExactVariants[i % HarborMini.ExactVariants.Count];
                if (resolver.Resolve(u).Outcome == ResolutionOutcome.Accepted) accepted++;
            }
        }

        Run(0, WarmUp);
        long before = GC.GetTotalMemory(forceFullCollection: true);
        Run(WarmUp, Resolves);
        long after = GC.GetTotalMemory(forceFullCollection: true);

        Assert.True(after - before < MaxGrowthBytes, $"managed heap grew by {(after - before) / 1024} KiB over {Resolves - WarmUp} resolves (bound {MaxGrowthBytes / 1024} KiB)");
        Assert.True(accepted >= Resolves * 98 / 100, $"only {accepted} of {Resolves} accepted: the exact-match mix did not run as intended");
    }
}

/// <summary>
/// The soak measures the whole process's managed heap, so it runs alone, after the parallel collections (a model being
/// quantised or read in another collection at the same time grew the heap by hundreds of MiB and failed it).
/// </summary>
[CollectionDefinition(Name, DisableParallelization = true)]
public sealed class SoakCollection : ICollectionFixture<ModelFixture>
{
    public const string Name = "soak (alone)";
}
