using TaskPhrase.Onnx;
using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// Many threads on one resolver give exactly the sequential results, and disposing the embedder while calls are in
/// flight fails cleanly. CI size: 16 threads × 2,000 resolves; the mix is 98 % exact matches (the approved phrases
/// of <see cref="HarborMini"/> written four ways, no model call) and 2 % model-path utterances (paraphrases, refusals,
/// guards). The full 16 × 10,000 run is <c>dotnet run -c Release --project tests/TaskPhrase.Benchmarks -- concurrency 16 10000</c>
/// (docs/reliability.md).
/// </summary>
[Collection(ModelCollection.Name)]
public class ConcurrencyTests(ModelFixture fixture)
{
    private const int Threads = 16;
    private const int PerThread = 2_000;
    private const int ModelEvery = 50;

    /// <summary>The i-th utterance of thread t: every <see cref="ModelEvery"/>th goes through the model, the rest are exact matches.</summary>
    internal static string Utterance(int thread, int i)
    {
        int k = thread * 7919 + i;
        return i % ModelEvery == thread % ModelEvery
            ? HarborMini.ModelPath[k % HarborMini.ModelPath.Count]
            : HarborMini.ExactVariants[k % HarborMini.ExactVariants.Count];
    }

    [Fact]
    public void Resolve_SixteenThreads_GiveExactlyTheSequentialResults()
    {
        var resolver = TaskResolver.Create(HarborMini.Registry(), fixture.Embedder);
        var expected = HarborMini.ExactVariants.Concat(HarborMini.ModelPath).Distinct()
            .ToDictionary(u => u, u => TaskResolverPropertyTests.Fingerprint(resolver.Resolve(u)), StringComparer.Ordinal);
        var mismatches = new System.Collections.Concurrent.ConcurrentQueue<string>();
        int modelCalls = 0;
        using var start = new Barrier(Threads);

        var workers = Enumerable.Range(0, Threads).Select(t => new Thread(() =>
        {
            start.SignalAndWait();
            for (int i = 0; i < PerThread; i++)
            {
                string u = Utterance(t, i);
                var r = resolver.Resolve(u);
                if (!r.ExactMatch) Interlocked.Increment(ref modelCalls);
                if (TaskResolverPropertyTests.Fingerprint(r) != expected[u]) mismatches.Enqueue($"thread {t}, call {i}: \"{u}\"");
            }
        })).ToList();
        workers.ForEach(w => w.Start());
        workers.ForEach(w => w.Join());

        Assert.Empty(mismatches);
        Assert.InRange(modelCalls, Threads * PerThread / ModelEvery, Threads * PerThread / ModelEvery + Threads * 2);
    }

    [Fact]
    public void ResolveMany_ParallelBatches_GiveExactlyTheSequentialResults()
    {
        var resolver = TaskResolver.Create(HarborMini.Registry(), fixture.Embedder);
        var batch = Enumerable.Range(0, 64).Select(i => Utterance(0, i)).ToList();
        var expected = batch.Select(u => (resolver.Resolve(u) is var r ? (r.Outcome, r.Reason, r.Task?.Id, r.Phrase) : default)).ToList();

        Parallel.For(0, 8, new ParallelOptions { MaxDegreeOfParallelism = 4 }, _ =>
        {
            var got = resolver.ResolveMany(batch);
            for (int i = 0; i < batch.Count; i++)
                Assert.Equal(expected[i], (got[i].Outcome, got[i].Reason, got[i].Task?.Id, got[i].Phrase));
        });
    }

    [Fact]
    public void Dispose_WhileResolvesAreInFlight_FailsCleanlyWithObjectDisposed()
    {
        // A private embedder: the shared one must stay alive for the other tests.
        var embedder = OnnxEmbedder.CreateDefault();
        var resolver = TaskResolver.Create(HarborMini.Registry(), embedder);
        var unexpected = new System.Collections.Concurrent.ConcurrentQueue<Exception>();
        int completed = 0, disposedErrors = 0;
        using var running = new CountdownEvent(4);

        var workers = Enumerable.Range(0, 4).Select(t => new Thread(() =>
        {
            bool signalled = false;
            for (int i = 0; ; i++)
            {
                try
                {
                    var r = i % 2 == 0 ? resolver.Resolve(HarborMini.ModelPath[(t + i) % HarborMini.ModelPath.Count])
                        : resolver.ResolveMany([HarborMini.ModelPath[(t + i + 1) % HarborMini.ModelPath.Count], "feed the fish"])[0];
                    TaskResolverPropertyTests.AssertValidPair(r);
                    Interlocked.Increment(ref completed);
                }
                catch (ObjectDisposedException)
                {
                    Interlocked.Increment(ref disposedErrors);
                    break;
                }
                catch (Exception e)
                {
                    unexpected.Enqueue(e);
                    break;
                }
                if (!signalled) { running.Signal(); signalled = true; }
            }
            if (!signalled) running.Signal();
        })).ToList();
        workers.ForEach(w => w.Start());
        running.Wait(TimeSpan.FromSeconds(30)); // every worker has finished at least one call
        embedder.Dispose();                       // waits for calls in flight, then refuses new ones
        Assert.True(workers.All(w => w.Join(TimeSpan.FromSeconds(30))), "a worker did not stop after the embedder was disposed");

        Assert.Empty(unexpected);
        Assert.Equal(4, disposedErrors);
        Assert.True(completed >= 4, $"only {completed} calls completed before the dispose");
        // Afterwards: model calls refuse cleanly, exact matches need no model and still work, a second dispose is harmless.
        Assert.Throws<ObjectDisposedException>(() => resolver.Resolve("could you water my basil plant"));
        Assert.Throws<ObjectDisposedException>(() => resolver.Rank("feed the fish"));
        Assert.Equal(ResolutionOutcome.Accepted, resolver.Resolve("feed the fish").Outcome);
        embedder.Dispose();
    }
}
