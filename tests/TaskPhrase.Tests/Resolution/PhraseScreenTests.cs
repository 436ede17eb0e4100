using System.Numerics.Tensors;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Tests.TestDoubles;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// The 8-bit phrase screen of best-phrase scoring. Its bounds hold for every row against the exact float dot product
/// (<see cref="TensorPrimitives.Dot(ReadOnlySpan{float}, ReadOnlySpan{float})"/>, the reference library); the integer
/// kernel equals a plain loop; and resolving with the screen gives exactly what the full scan gives — every field,
/// the cross-task anchor rule included, which must score tasks the screen left out (differential testing, common
/// practice).
/// </summary>
public class PhraseScreenTests
{
    private const int Dims = 48;

    [Fact]
    public void Bounds_RandomRows_HoldForEveryExactScore()
    {
        var random = new Random(17);
        int rows = 603; // not a multiple of four: the last rows go through the one-row kernel
        var phrases = new float[rows * Dims];
        for (int r = 0; r < rows; r++) Gaussian(random).CopyTo(phrases.AsSpan(r * Dims));
        var screen = PhraseScreen.Build(phrases, Dims);
        var oneRowPerTask = Enumerable.Range(0, rows).ToArray();
        var lower = new double[rows];
        var upper = new double[rows];
        var approx = new double[rows];
        var bound = new double[rows];
        double widest = 0;
        for (int trial = 0; trial < 200; trial++)
        {
            var v = Gaussian(random);
            if (trial % 4 == 0) phrases.AsSpan(random.Next(rows) * Dims, Dims).CopyTo(v);
            Assert.True(screen.Bounds(v, oneRowPerTask, lower, upper));
            // The task-maxima fold and the per-row intervals (RowBounds) share one arithmetic: the same doubles, bit for bit.
            Assert.True(screen.RowBounds(v, approx, bound));
            for (int r = 0; r < rows; r++)
            {
                Assert.Equal(approx[r] + bound[r], upper[r]);
                Assert.Equal(approx[r] - bound[r], lower[r]);
                float exact = TensorPrimitives.Dot(v, phrases.AsSpan(r * Dims, Dims));
                Assert.InRange(exact, lower[r], upper[r]);
                widest = Math.Max(widest, upper[r] - lower[r]);
            }
        }
        // Tight enough to screen: the interval is a small part of the score range of unit vectors.
        Assert.True(widest < 0.1, $"bound interval up to {widest}");
    }

    [Theory]
    [InlineData(48, 7)] // tasks of seven rows: runs cross four-row groups and the 256-row blocks
    [InlineData(50, 9)] // 50 dimensions: no four-row kernel, and the query's last two components past the vector loop
    [InlineData(384, 10)]
    public void Bounds_ContiguousAndInterleavedTasks_AreTheMaximaOfTheRowBounds(int dims, int rowsPerTask)
    {
        // Each task's bounds must be the maxima of its rows' own bounds (RowBounds), bit for bit, whether its rows are
        // contiguous (as in a resolver) or spread out; and hold for the exact scores.
        var random = new Random(dims + rowsPerTask);
        int rows = 777;
        var phrases = new float[rows * dims];
        for (int r = 0; r < rows; r++) Gaussian(random, dims).CopyTo(phrases.AsSpan(r * dims));
        var screen = PhraseScreen.Build(phrases, dims);
        var approx = new double[rows];
        var bound = new double[rows];
        foreach (bool contiguous in new[] { true, false })
        {
            int tasks = (rows + rowsPerTask - 1) / rowsPerTask;
            var phraseTask = Enumerable.Range(0, rows).Select(r => contiguous ? r / rowsPerTask : r % tasks).ToArray();
            var lower = new double[tasks];
            var upper = new double[tasks];
            for (int trial = 0; trial < 40; trial++)
            {
                var v = Gaussian(random, dims);
                var rowUpper = new double[rows];
                Assert.True(screen.Bounds(v, phraseTask, lower, upper, rowUpper));
                Assert.True(screen.RowBounds(v, approx, bound));
                for (int r = 0; r < rows; r++) Assert.Equal(approx[r] + bound[r], rowUpper[r]);
                var expectedUpper = Enumerable.Repeat(double.NegativeInfinity, tasks).ToArray();
                var expectedLower = Enumerable.Repeat(double.NegativeInfinity, tasks).ToArray();
                var best = Enumerable.Repeat(float.NegativeInfinity, tasks).ToArray();
                for (int r = 0; r < rows; r++)
                {
                    int t = phraseTask[r];
                    expectedUpper[t] = Math.Max(expectedUpper[t], approx[r] + bound[r]);
                    expectedLower[t] = Math.Max(expectedLower[t], approx[r] - bound[r]);
                    best[t] = Math.Max(best[t], TensorPrimitives.Dot(v, phrases.AsSpan(r * dims, dims)));
                }
                Assert.Equal(expectedUpper, upper);
                Assert.Equal(expectedLower, lower);
                for (int t = 0; t < tasks; t++) Assert.InRange(best[t], lower[t], upper[t]);
            }
        }
    }

    [Fact]
    public void Bounds_ZeroQuery_HoldsAtZero()
    {
        // A zero query has no quantisation step: every exact score is 0 and must still lie within the bounds.
        var random = new Random(6);
        var phrases = Enumerable.Range(0, 4).SelectMany(_ => Gaussian(random)).ToArray();
        var screen = PhraseScreen.Build(phrases, Dims);
        var approx = new double[4];
        var bound = new double[4];
        Assert.True(screen.RowBounds(new float[Dims], approx, bound));
        for (int r = 0; r < 4; r++) Assert.InRange(0.0, approx[r] - bound[r], approx[r] + bound[r]);
    }

    [Fact]
    public void Bounds_NonFiniteQuery_Declines()
    {
        var screen = PhraseScreen.Build(Gaussian(new Random(1)), Dims);
        foreach (float bad in new[] { float.NaN, float.PositiveInfinity, float.NegativeInfinity })
        {
            var v = new float[Dims];
            v[3] = bad;
            Assert.False(screen.Bounds(v, [0], new double[1], new double[1]));
            Assert.False(screen.RowBounds(v, new double[1], new double[1]));
        }
    }

    [Fact]
    public void DotInt8_RandomVectors_EqualsPlainLoop()
    {
        var random = new Random(2);
        foreach (int n in new[] { 0, 1, 15, 16, 17, 384, 391 })
        {
            var q = Enumerable.Range(0, n).Select(_ => (sbyte)random.Next(-127, 128)).ToArray();
            var p = Enumerable.Range(0, n).Select(_ => (short)random.Next(-127, 128)).ToArray();
            int expected = 0;
            for (int i = 0; i < n; i++) expected += q[i] * p[i];
            Assert.Equal(expected, PhraseScreen.DotInt8(q, p));
        }
    }

    [Fact]
    public void DotShiftedVnni_RandomVectors_EqualsPlainLoopAfterUndoingTheShift()
    {
        // The VNNI path (u8 × s8, the query shifted by +128) must give the same integer as the plain loop, including the
        // extremes −127 and 127; machines without AVX-VNNI use DotInt8 (checked above), so only the shift algebra runs.
        var random = new Random(3);
        foreach (int n in new[] { 32, 64, 96, 384, 1024 })
        {
            var q = Enumerable.Range(0, n).Select(i => (sbyte)(i % 7 == 0 ? -127 : i % 11 == 0 ? 127 : random.Next(-127, 128))).ToArray();
            var p = Enumerable.Range(0, n).Select(i => (short)(i % 5 == 0 ? 127 : i % 13 == 0 ? -127 : random.Next(-127, 128))).ToArray();
            int expected = 0, qSum = 0;
            for (int i = 0; i < n; i++) { expected += q[i] * p[i]; qSum += q[i]; }
            var shifted = p.Select(x => (byte)(x + 128)).ToArray();
            int unshifted = 0;
            for (int i = 0; i < n; i++) unshifted += shifted[i] * q[i];
            Assert.Equal(expected, unshifted - 128 * qSum);
            if (System.Runtime.Intrinsics.X86.AvxVnni.IsSupported)
                Assert.Equal(expected, PhraseScreen.DotShiftedVnni(shifted, q) - 128 * qSum);
        }
    }

    [Fact]
    public void DotShiftedVnni4_FourRows_EqualTheOneRowKernel()
    {
        // The four-row kernel shares the query loads between four accumulators; each result must be the same integer
        // as the one-row kernel's and the plain loop's (extremes included).
        if (!System.Runtime.Intrinsics.X86.AvxVnni.IsSupported) return; // nothing to compare with; DotInt8 is checked above
        var random = new Random(4);
        foreach (int n in new[] { 32, 64, 384, 1024 })
        {
            var rows = Enumerable.Range(0, 4 * n).Select(i => (sbyte)(i % 9 == 0 ? -127 : i % 17 == 0 ? 127 : random.Next(-127, 128))).ToArray();
            var u = Enumerable.Range(0, n).Select(i => (byte)(i % 5 == 0 ? 255 : i % 13 == 0 ? 1 : random.Next(1, 256))).ToArray();
            var dots = PhraseScreen.DotShiftedVnni4(u, rows);
            for (int k = 0; k < 4; k++)
            {
                var row = rows.AsSpan(k * n, n);
                int plain = 0;
                for (int i = 0; i < n; i++) plain += u[i] * row[i];
                Assert.Equal(plain, dots[k]);
                Assert.Equal(PhraseScreen.DotShiftedVnni(u, row), dots[k]);
            }
        }
    }

    [Fact]
    public void DotInt8x4_FourRows_EqualThePlainLoop()
    {
        // The four-row 16-bit kernel (AVX-512BW 32 lanes, then AVX2 16 lanes for the rest) must give each row's exact
        // integer, extremes included; 16 and 48 dimensions take only or partly the 16-lane loop.
        if (!System.Runtime.Intrinsics.X86.Avx2.IsSupported) return; // the fold uses DotInt8 per row there (checked above)
        var random = new Random(5);
        foreach (int n in new[] { 16, 32, 48, 384, 1024 })
        {
            var rows = Enumerable.Range(0, 4 * n).Select(i => (sbyte)(i % 9 == 0 ? -127 : i % 17 == 0 ? 127 : random.Next(-127, 128))).ToArray();
            var p = Enumerable.Range(0, n).Select(i => (short)(i % 5 == 0 ? 127 : i % 13 == 0 ? -127 : random.Next(-127, 128))).ToArray();
            var dots = PhraseScreen.DotInt8x4(rows, p);
            for (int k = 0; k < 4; k++)
            {
                var row = rows.AsSpan(k * n, n);
                int plain = 0;
                for (int i = 0; i < n; i++) plain += row[i] * p[i];
                Assert.Equal(plain, dots[k]);
            }
        }
    }

    /// <summary>
    /// 70 tasks of 10 phrases ("verb the object"); utterances name one task's object and another's, embedded between
    /// the two, so the anchor rule must judge a competitor that is often outside the shown candidates.
    /// </summary>
    [Theory]
    [InlineData(ScoringStrategy.BestPhrase, 1)]
    [InlineData(ScoringStrategy.BestPhrase, 5)]
    [InlineData(ScoringStrategy.Blend, 1)]
    [InlineData(ScoringStrategy.Blend, 5)]
    [InlineData(ScoringStrategy.TopK, 1)]
    [InlineData(ScoringStrategy.TopK, 5)]
    [InlineData(ScoringStrategy.TopK, 5, 6)] // k above four: the list of largest bounds kept in memory, not registers
    public void Resolve_WithScreen_EqualsFullScan(ScoringStrategy strategy, int candidates, int topK = 3)
    {
        var random = new Random(40 + candidates);
        string[] verbs = ["move", "fetch", "lift", "carry", "bring", "hold", "take", "pass", "find", "grab"];
        var vectors = new Dictionary<string, float[]>(StringComparer.Ordinal);
        var tasks = new List<TaskDefinition>();
        for (int t = 0; t < 70; t++)
        {
            var phrases = verbs.Select(v => $"{v} the {Object(t)}").ToArray();
            foreach (var p in phrases) vectors[p] = Gaussian(random);
            // Equal scores within a task: the full scan keeps the first row, so must the screened re-scoring.
            if (t % 5 == 0) vectors[phrases[7]] = vectors[phrases[2]];
            tasks.Add(new TaskDefinition { Id = $"task-{t}", Title = $"Handle the {Object(t)}", Controller = new ControllerBinding("m.v1", 1), Phrases = phrases });
        }
        var utterances = new List<string>();
        for (int i = 0; i < 300; i++)
        {
            int a = random.Next(70), b = (a + 1 + random.Next(69)) % 70;
            string u = $"{verbs[i % 10]} the {Object(a)} and the {Object(b)} {i}";
            var v = vectors[$"{verbs[i % 10]} the {Object(a)}"].ToArray();
            var other = new float[Dims];
            TensorPrimitives.Multiply(vectors[$"{verbs[(i + 3) % 10]} the {Object(b)}"], (float)(0.2 + random.NextDouble()), other);
            TensorPrimitives.Add(v, other, v);
            vectors[u] = v;
            utterances.Add(u);
        }
        var generator = new ScriptedEmbeddingGenerator(vectors);
        var registry = new TaskRegistry(tasks, RegistryDefaults.Standard, "screen-test");
        ResolverOptions Options(bool screen) => new()
        {
            Scoring = strategy, UnintelligibleGuard = false, Candidates = candidates, AcceptOverride = 0f, PhraseScreen = screen, TopK = topK,
        };
        var screened = TaskResolver.Create(registry, generator, Options(true));
        var full = TaskResolver.Create(registry, generator, Options(false));

        int mixed = 0, kept = 0;
        foreach (var u in utterances)
        {
            var expected = full.Resolve(u);
            var actual = screened.Resolve(u);
            Assert.Equal(expected.Candidates, actual.Candidates);
            Assert.Equal(expected.UncoveredWords, actual.UncoveredWords);
            Assert.Equal(expected with { Elapsed = default, Candidates = [], UncoveredWords = [] }, actual with { Elapsed = default, Candidates = [], UncoveredWords = [] });
            Assert.Equal(full.Rank(u, 9), screened.Rank(u, 9));
            if (expected.Detail?.StartsWith("mixes tasks", StringComparison.Ordinal) == true) mixed++;
            else kept++;
        }
        // Both sides of the anchor rule were exercised (at the default k; with k = 6 the top-k means are closer and the
        // rule fires for nearly every utterance, which still compares every field above).
        if (topK == 3) Assert.True(mixed >= 20 && kept >= 20, $"anchor rule fired {mixed} times, not {kept} times");
    }

    private static string Object(int t) => $"ob{(char)('a' + t / 26)}{(char)('a' + t % 26)}ject";

    /// <summary>A random unit vector (normalised Gaussian draws, common practice).</summary>
    private static float[] Gaussian(Random random) => Gaussian(random, Dims);

    /// <summary>A uniformly random unit vector (normalised Gaussian draws, Box–Muller; common practice).</summary>
    private static float[] Gaussian(Random random, int dims)
    {
        var v = Enumerable.Range(0, dims).Select(_ => (float)(Math.Sqrt(-2.0 * Math.Log(1.0 - random.NextDouble())) * Math.Cos(2 * Math.PI * random.NextDouble()))).ToArray();
        TensorPrimitives.Divide(v, TensorPrimitives.Norm(v), v);
        return v;
    }
}
