namespace TaskPhrase.Resolution.Scoring;

/// <summary>
/// A whitening transform fitted to a registry's approved phrase embeddings, and the whitened task centroids.
/// The embedding x of an utterance becomes y = W (x − m), where m is the mean of the task means and W Σ Wᵀ = I for
/// the shrunk covariance Σ = (1 − λ) S + λ (tr S / d) I of the phrases (S within-task or pooled, see
/// <see cref="CovarianceKind"/>; λ from Ledoit &amp; Wolf (2004) or fixed). A task's score is the cosine of y to
/// W (μₜ − m), μₜ being the task's mean phrase embedding: directions in which wordings of one task commonly vary
/// count for less, directions that separate tasks for more.
/// </summary>
/// <remarks>
/// Immutable and thread-safe. Fitting is deterministic: the same phrase embeddings and options give bit-identical
/// results on every machine (only additions, multiplications, divisions and square roots, in a fixed order;
/// W = L⁻¹ from the Cholesky factor Σ = L Lᵀ). With a single
/// task there is nothing to centre between, so m = 0; when the phrases do not vary at all (one phrase per task),
/// Σ is taken as the identity.
/// </remarks>
public sealed class Whitening
{
    private const string Magic = "TPWH";
    private const ushort FormatVersion = 1;

    private readonly float[] _mean;
    private readonly float[] _lower; // W, lower triangle packed by rows: row a holds a + 1 values.
    private readonly float[] _centroids;

    private Whitening(int dimensions, int taskCount, CovarianceKind covariance, double shrinkage, string digest,
        float[] mean, float[] lower, float[] centroids)
    {
        Dimensions = dimensions;
        TaskCount = taskCount;
        Covariance = covariance;
        Shrinkage = shrinkage;
        TrainingDigest = digest;
        _mean = mean;
        _lower = lower;
        _centroids = centroids;
    }

    /// <summary>W's lower triangle packed by rows and the centring mean (for tests of <see cref="Apply"/>).</summary>
    internal (float[] Lower, float[] Mean) Parameters => (_lower, _mean);

    /// <summary>Width of the embeddings (and of the whitened vectors).</summary>
    public int Dimensions { get; }

    /// <summary>Number of tasks (rows of the centroid matrix).</summary>
    public int TaskCount { get; }

    /// <summary>The covariance the transform was fitted to.</summary>
    public CovarianceKind Covariance { get; }

    /// <summary>The shrinkage λ in force (estimated by Ledoit–Wolf unless it was fixed).</summary>
    public double Shrinkage { get; }

    /// <summary>SHA-256 (lower-case hex) of the inputs it was fitted to (embeddings, task labels, options).</summary>
    public string TrainingDigest { get; }

    /// <summary>
    /// Fits the whitening to approved phrase embeddings.
    /// </summary>
    /// <param name="phrases">One row per approved phrase, row-major, <paramref name="dimensions"/> wide.</param>
    /// <param name="phraseTask">Each row's task position, in [0, <paramref name="taskCount"/>).</param>
    /// <param name="taskCount">Number of tasks; every task needs at least one phrase.</param>
    /// <param name="dimensions">Width of the embeddings.</param>
    /// <param name="options">Covariance kind and shrinkage; null for <see cref="LearnedScoringOptions.Default"/>.</param>
    /// <exception cref="ArgumentException">Sizes disagree, a label is out of range, or a task has no phrase.</exception>
    public static Whitening Fit(ReadOnlySpan<float> phrases, ReadOnlySpan<int> phraseTask, int taskCount, int dimensions,
        LearnedScoringOptions? options = null)
    {
        options ??= LearnedScoringOptions.Default;
        int d = dimensions, n = phraseTask.Length;
        CheckInputs(phrases, phraseTask, taskCount, d);

        var taskMean = new double[taskCount * d];
        var counts = new int[taskCount];
        for (int i = 0; i < n; i++)
        {
            int t = phraseTask[i];
            counts[t]++;
            var row = phrases.Slice(i * d, d);
            var mean = taskMean.AsSpan(t * d, d);
            for (int a = 0; a < d; a++) mean[a] += row[a];
        }
        var m = new double[d];
        for (int t = 0; t < taskCount; t++)
        {
            var mean = taskMean.AsSpan(t * d, d);
            for (int a = 0; a < d; a++) mean[a] /= counts[t];
            if (taskCount > 1) Kernels.AddScaled(mean, 1.0 / taskCount, m);
        }

        // Scatter S = (1/n) Σ r rᵀ of the residuals (upper triangle), and Σ ‖r‖⁴ for the Ledoit–Wolf estimate.
        var s = new double[d * d];
        var r = new double[d];
        double sumR4 = 0;
        for (int i = 0; i < n; i++)
        {
            var row = phrases.Slice(i * d, d);
            var centre = options.Covariance == CovarianceKind.WithinTask ? taskMean.AsSpan(phraseTask[i] * d, d) : m.AsSpan();
            for (int a = 0; a < d; a++) r[a] = row[a] - centre[a];
            double rr = Kernels.Dot(r, r);
            sumR4 += rr * rr;
            for (int a = 0; a < d; a++) Kernels.AddScaled(r.AsSpan(a), r[a], s.AsSpan(a * d + a, d - a));
        }
        double trace = 0;
        for (int a = 0; a < d; a++)
        {
            for (int b = a; b < d; b++) { s[a * d + b] /= n; s[b * d + a] = s[a * d + b]; }
            trace += s[a * d + a];
        }
        double mu = trace / d;
        double lambda;
        if (!(mu > 1e-20))
        {
            // No variation at all (one phrase per task): whiten with the identity.
            lambda = 1;
            mu = 1;
        }
        else lambda = options.Shrinkage ?? LedoitWolf(s, d, n, mu, sumR4);
        for (int a = 0; a < d; a++)
            for (int b = 0; b < d; b++)
                s[a * d + b] = (1 - lambda) * s[a * d + b] + (a == b ? lambda * mu : 0);

        var w = Cholesky.InvertLower(Cholesky.Factor(s, d), d);
        var lower = new float[d * (d + 1) / 2];
        for (int a = 0, k = 0; a < d; a++)
            for (int b = 0; b <= a; b++) lower[k++] = (float)w[a * d + b];
        var meanF = Array.ConvertAll(m, v => (float)v);

        var result = new Whitening(d, taskCount, options.Covariance, lambda,
            ScorerBytes.Digest("whitening", phrases, phraseTask, [taskCount, d, (double)options.Covariance, options.Shrinkage ?? -1]),
            meanF, lower, new float[taskCount * d]);
        var centred = new float[d];
        for (int t = 0; t < taskCount; t++)
        {
            for (int a = 0; a < d; a++) centred[a] = (float)taskMean[t * d + a];
            var c = result._centroids.AsSpan(t * d, d);
            result.Apply(centred, c);
            Normalize(c);
        }
        return result;
    }

    /// <summary>
    /// The Ledoit–Wolf (2004) shrinkage intensity for the scatter <paramref name="s"/> of <paramref name="n"/> centred
    /// samples: min(b̄², d²) / d², with d² = ‖S − μI‖² and b̄² = (1/n²) Σₖ ‖xₖxₖᵀ − S‖² (norms ‖A‖² = tr(AAᵀ)/p),
    /// where Σₖ ‖xₖxₖᵀ − S‖²_F = Σₖ ‖xₖ‖⁴ − n ‖S‖²_F.
    /// </summary>
    internal static double LedoitWolf(ReadOnlySpan<double> s, int p, int n, double mu, double sumR4)
    {
        double frob = Kernels.Dot(s, s);
        double delta = (frob - p * mu * mu) / p;
        double beta = (sumR4 / n - frob) / ((double)p * n);
        beta = Math.Min(beta, delta);
        return beta <= 0 ? 0 : Math.Clamp(beta / delta, 0, 1);
    }

    /// <summary>Writes y = W (x − m) for the embedding <paramref name="embedding"/> into <paramref name="destination"/>.</summary>
    /// <exception cref="ArgumentException">A span is not <see cref="Dimensions"/> wide.</exception>
    public void Apply(ReadOnlySpan<float> embedding, Span<float> destination)
    {
        int d = Dimensions;
        if (embedding.Length != d || destination.Length != d)
            throw new ArgumentException($"The whitening is {d} wide; got an embedding of {embedding.Length} and a destination of {destination.Length}.");
        Span<float> centred = d <= 1024 ? stackalloc float[d] : new float[d];
        for (int a = 0; a < d; a++) centred[a] = embedding[a] - _mean[a];
        // Row a of the packed lower triangle starts at a(a+1)/2 and holds a + 1 values. Four consecutive rows with the
        // same number of whole blocks of 16 share their loads (each result bit-identical to Kernels.Dot).
        Span<float> four = stackalloc float[4];
        int row = 0, offset = 0;
        while (row < d)
        {
            if (row + 3 < d && (row + 1) / 16 == (row + 4) / 16)
            {
                var lower = _lower.AsSpan();
                Kernels.DotSameBlocks4(centred, lower.Slice(offset, row + 1), lower.Slice(offset + row + 1, row + 2),
                    lower.Slice(offset + 2 * row + 3, row + 3), lower.Slice(offset + 3 * row + 6, row + 4), four);
                four.CopyTo(destination[row..]);
                offset += 4 * row + 10;
                row += 4;
                continue;
            }
            destination[row] = Kernels.Dot(_lower.AsSpan(offset, row + 1), centred[..(row + 1)]);
            offset += row + 1;
            row++;
        }
    }

    /// <summary>
    /// Writes each task's score, the cosine of the whitened embedding to the task's whitened centroid, into
    /// <paramref name="scores"/> (<see cref="TaskCount"/> wide).
    /// </summary>
    public void ScoreTasks(ReadOnlySpan<float> embedding, Span<float> scores)
    {
        Span<float> y = Dimensions <= 1024 ? stackalloc float[Dimensions] : new float[Dimensions];
        Apply(embedding, y);
        ScoreWhitened(y, scores);
    }

    /// <summary>Cosines of an already whitened vector to the whitened centroids.</summary>
    internal void ScoreWhitened(ReadOnlySpan<float> y, Span<float> scores)
    {
        if (scores.Length != TaskCount) throw new ArgumentException($"Expected room for {TaskCount} scores, got {scores.Length}.", nameof(scores));
        int d = Dimensions;
        float norm = MathF.Sqrt(Kernels.Dot(y, y));
        if (!(norm > 0))
        {
            scores.Clear();
            return;
        }
        // Four centroids per pass (each result bit-identical to Kernels.Dot).
        Span<float> dots = stackalloc float[4];
        for (int t = 0; t < TaskCount; t += 4)
        {
            int count = Math.Min(4, TaskCount - t);
            Kernels.Dot4(y, _centroids, t, count, dots);
            for (int k = 0; k < count; k++) scores[t + k] = dots[k] / norm;
        }
    }

    internal static void Normalize(Span<float> v)
    {
        float norm = MathF.Sqrt(Kernels.Dot(v, v));
        if (norm > 0) for (int i = 0; i < v.Length; i++) v[i] /= norm;
    }

    internal static void CheckInputs(ReadOnlySpan<float> phrases, ReadOnlySpan<int> phraseTask, int taskCount, int d)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(d, 1, nameof(d));
        ArgumentOutOfRangeException.ThrowIfLessThan(taskCount, 1, nameof(taskCount));
        if (phrases.Length != phraseTask.Length * d)
            throw new ArgumentException($"Expected {phraseTask.Length} phrase embeddings of {d} dimensions ({phraseTask.Length * d} values), got {phrases.Length} values.", nameof(phrases));
        var seen = new bool[taskCount];
        for (int i = 0; i < phraseTask.Length; i++)
        {
            int t = phraseTask[i];
            if ((uint)t >= (uint)taskCount) throw new ArgumentException($"Phrase row {i} has task position {t}; expected 0 to {taskCount - 1}.", nameof(phraseTask));
            seen[t] = true;
        }
        int missing = Array.IndexOf(seen, false);
        if (missing >= 0) throw new ArgumentException($"Task position {missing} has no approved phrase; every task needs at least one.", nameof(phraseTask));
    }

    /// <summary>
    /// Serialises the whitening (little-endian): magic <c>TPWH</c>, u16 version 1, i32 dimensions, i32 tasks,
    /// i32 covariance kind, f64 shrinkage, the 32-byte training digest (length-prefixed), the mean (f32 × d), W's lower
    /// triangle by rows (f32 × d(d+1)/2), the whitened centroids (f32 × tasks × d), and a SHA-256 of all of it.
    /// </summary>
    public byte[] ToBytes()
    {
        var w = new ScorerBytes.Writer(Magic, FormatVersion);
        WriteTo(w);
        return w.Finish();
    }

    internal void WriteTo(ScorerBytes.Writer w)
    {
        w.Int32(Dimensions);
        w.Int32(TaskCount);
        w.Int32((int)Covariance);
        w.Double(Shrinkage);
        w.Bytes(Convert.FromHexString(TrainingDigest));
        w.Floats(_mean);
        w.Floats(_lower);
        w.Floats(_centroids);
    }

    /// <summary>Reads a whitening written by <see cref="ToBytes"/>.</summary>
    /// <exception cref="FormatException">The bytes are not a whitening of this format version, are truncated, or fail their SHA-256 check.</exception>
    public static Whitening FromBytes(ReadOnlySpan<byte> bytes)
    {
        var r = new ScorerBytes.Reader(bytes, Magic, FormatVersion, "whitening");
        var result = ReadFrom(ref r);
        r.End();
        return result;
    }

    internal static Whitening ReadFrom(ref ScorerBytes.Reader r)
    {
        int d = r.Int32(), tasks = r.Int32(), kind = r.Int32();
        double shrinkage = r.Double();
        if (d < 1 || d > 65_536 || tasks < 1 || tasks > 1_000_000 || !Enum.IsDefined((CovarianceKind)kind) || !(shrinkage is >= 0 and <= 1))
            throw new FormatException($"The whitening data has an invalid header (dimensions {d}, tasks {tasks}, covariance {kind}, shrinkage {shrinkage}).");
        string digest = Convert.ToHexStringLower(r.Bytes());
        var mean = r.Floats(d);
        var lower = r.Floats(d * (d + 1) / 2);
        var centroids = r.Floats(checked(tasks * d));
        return new Whitening(d, tasks, (CovarianceKind)kind, shrinkage, digest, mean, lower, centroids);
    }
}
