namespace TaskPhrase.Resolution.Scoring;

/// <summary>
/// A learned task head: multinomial logistic regression on whitened embeddings, trained only on a registry's
/// approved phrases (one class per task) and, where a registry has any, its <c>must_reject</c> phrases as one extra
/// "look-alike" class. p = softmax((W f + b) / T), where f is the whitened embedding scaled to length √d (see
/// <see cref="Whitening"/>) and T the temperature.
/// </summary>
/// <remarks>
/// <para>Training minimises the mean cross-entropy plus (λ/2)‖W‖² (biases unpenalised) with L-BFGS from all-zero
/// weights, visiting phrases in registry order. Every sum runs in a fixed order whatever the CPU's vector width or
/// the thread schedule, so the same embeddings and options give byte-identical weights run after run; across operating
/// systems only the platform's exp and log may differ in the last bit. It never sees probe suites.</para>
/// <para>Immutable and thread-safe.</para>
/// </remarks>
public sealed class TaskHead
{
    private const string Magic = "TPHD";
    private const ushort FormatVersion = 1;

    /// <summary>Format version 2 adds the probability weight after the temperature; written only when it is not 0.5.</summary>
    private const ushort WeightedFormatVersion = 2;

    /// <summary>The probability weight of the geometric mean √(p · c), the default.</summary>
    public const double DefaultProbabilityWeight = 0.5;

    private readonly float[] _weights; // Classes × Dimensions, row-major.
    private readonly float[] _bias;    // Classes.
    private readonly float[] _centroids; // TaskCount × Dimensions: normalised mean phrase embedding of each task.

    private TaskHead(Whitening whitening, bool hasReject, double l2, double temperature, int iterations, double loss,
        string digest, float[] weights, float[] bias, float[] centroids, double probabilityWeight = DefaultProbabilityWeight)
    {
        ProbabilityWeight = probabilityWeight;
        Whitening = whitening;
        HasRejectClass = hasReject;
        L2 = l2;
        Temperature = temperature;
        Iterations = iterations;
        TrainingLoss = loss;
        TrainingDigest = digest;
        _weights = weights;
        _bias = bias;
        _centroids = centroids;
    }

    /// <summary>The whitening the head reads its inputs through (fitted to the same approved phrases).</summary>
    public Whitening Whitening { get; }

    /// <summary>Width of the embeddings.</summary>
    public int Dimensions => Whitening.Dimensions;

    /// <summary>Number of task classes.</summary>
    public int TaskCount => Whitening.TaskCount;

    /// <summary>Whether the head has the extra look-alike class (the registry had <c>must_reject</c> phrases).</summary>
    public bool HasRejectClass { get; }

    /// <summary>Number of classes: tasks, plus one when <see cref="HasRejectClass"/>.</summary>
    public int Classes => TaskCount + (HasRejectClass ? 1 : 0);

    /// <summary>The L2 penalty it was trained with.</summary>
    public double L2 { get; }

    /// <summary>The softmax temperature applied at resolve time.</summary>
    public double Temperature { get; }

    /// <summary>
    /// Weight α of the head's probability in the task score p^α · max(0, c)^(1 − α) (c the cosine to the task's
    /// centroid); 0.5, the geometric mean, by default. Applied at resolve time, like the temperature.
    /// </summary>
    public double ProbabilityWeight { get; }

    /// <summary>L-BFGS iterations the training took.</summary>
    public int Iterations { get; }

    /// <summary>The training objective at the end (mean cross-entropy plus penalty).</summary>
    public double TrainingLoss { get; }

    /// <summary>SHA-256 (lower-case hex) of the training inputs (embeddings, labels, L2, iteration limit).</summary>
    public string TrainingDigest { get; }

    /// <summary>Trains a head on approved phrase embeddings and, optionally, must_reject embeddings.</summary>
    /// <param name="phrases">One row per approved phrase, row-major, <paramref name="dimensions"/> wide.</param>
    /// <param name="phraseTask">Each row's task position, in [0, <paramref name="taskCount"/>).</param>
    /// <param name="taskCount">Number of tasks; every task needs at least one phrase.</param>
    /// <param name="mustReject">must_reject embeddings, row-major (may be empty): the look-alike class.</param>
    /// <param name="dimensions">Width of the embeddings.</param>
    /// <param name="options">Whitening, L2, temperature and iteration limit; null for <see cref="LearnedScoringOptions.Default"/>.</param>
    /// <exception cref="ArgumentException">Sizes disagree, a label is out of range, or a task has no phrase.</exception>
    public static TaskHead Train(ReadOnlySpan<float> phrases, ReadOnlySpan<int> phraseTask, int taskCount,
        ReadOnlySpan<float> mustReject, int dimensions, LearnedScoringOptions? options = null)
    {
        options ??= LearnedScoringOptions.Default;
        int d = dimensions;
        Whitening.CheckInputs(phrases, phraseTask, taskCount, d);
        if (mustReject.Length % d != 0)
            throw new ArgumentException($"must_reject embeddings hold {mustReject.Length} values, not a multiple of {d} dimensions.", nameof(mustReject));
        var whitening = Whitening.Fit(phrases, phraseTask, taskCount, d, options);
        int rejects = mustReject.Length / d;
        bool hasReject = rejects > 0;
        int n = phraseTask.Length + rejects, k = taskCount + (hasReject ? 1 : 0);

        var x = new float[n * d];
        var labels = new int[n];
        for (int i = 0; i < n; i++)
        {
            bool approved = i < phraseTask.Length;
            var source = approved ? phrases.Slice(i * d, d) : mustReject.Slice((i - phraseTask.Length) * d, d);
            var row = x.AsSpan(i * d, d);
            Features(whitening, source, row);
            labels[i] = approved ? phraseTask[i] : taskCount;
        }

        var objective = new Objective(x, labels, n, d, k, options.L2);
        var theta = new double[k * d + k];
        int maxIterations = options.MaxIterations;
        var result = Lbfgs.Minimize(objective.Evaluate, theta, maxIterations);

        var digestInputs = new float[phrases.Length + mustReject.Length];
        phrases.CopyTo(digestInputs);
        mustReject.CopyTo(digestInputs.AsSpan(phrases.Length));
        string digest = ScorerBytes.Digest("task-head", digestInputs, phraseTask,
            [taskCount, d, (double)options.Covariance, options.Shrinkage ?? -1, options.L2, maxIterations]);
        var weights = new float[k * d];
        for (int i = 0; i < weights.Length; i++) weights[i] = (float)theta[i];
        var bias = new float[k];
        for (int c = 0; c < k; c++) bias[c] = (float)theta[k * d + c];
        var centroids = new float[taskCount * d];
        for (int i = 0; i < phraseTask.Length; i++) Kernels.AddScaled(phrases.Slice(i * d, d), 1f, centroids.AsSpan(phraseTask[i] * d, d));
        for (int t = 0; t < taskCount; t++) Whitening.Normalize(centroids.AsSpan(t * d, d));
        return new TaskHead(whitening, hasReject, options.L2, options.Temperature, result.Iterations, result.Value, digest, weights, bias, centroids, options.ProbabilityWeight);
    }

    /// <summary>The head's input: the whitened embedding scaled to length √d (components of unit scale).</summary>
    private static void Features(Whitening whitening, ReadOnlySpan<float> embedding, Span<float> destination)
    {
        whitening.Apply(embedding, destination);
        Whitening.Normalize(destination);
        float scale = MathF.Sqrt(destination.Length);
        for (int a = 0; a < destination.Length; a++) destination[a] *= scale;
    }

    /// <summary>The same head with another softmax temperature (no retraining).</summary>
    /// <exception cref="ArgumentOutOfRangeException">Not in [0.01, 100].</exception>
    public TaskHead WithTemperature(double temperature)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(temperature, 0.01);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(temperature, 100);
        return new TaskHead(Whitening, HasRejectClass, L2, temperature, Iterations, TrainingLoss, TrainingDigest, _weights, _bias, _centroids, ProbabilityWeight);
    }

    /// <summary>The same head with another probability weight α (no retraining; see <see cref="ProbabilityWeight"/>).</summary>
    /// <exception cref="ArgumentOutOfRangeException">Not in [0, 1].</exception>
    public TaskHead WithProbabilityWeight(double weight)
    {
        if (!(weight is >= 0 and <= 1)) throw new ArgumentOutOfRangeException(nameof(weight), weight, "The probability weight must lie in [0, 1].");
        return new TaskHead(Whitening, HasRejectClass, L2, Temperature, Iterations, TrainingLoss, TrainingDigest, _weights, _bias, _centroids, weight);
    }

    /// <summary>
    /// Writes the class probabilities for <paramref name="embedding"/> into <paramref name="probabilities"/>
    /// (<see cref="Classes"/> wide: tasks in registry order, then the look-alike class if any) and the head's input f (the
    /// whitened embedding scaled to length √d) into <paramref name="whitened"/> (<see cref="Dimensions"/> wide).
    /// </summary>
    /// <exception cref="ArgumentException">A span has the wrong width.</exception>
    public void Predict(ReadOnlySpan<float> embedding, Span<float> probabilities, Span<float> whitened)
    {
        if (probabilities.Length != Classes) throw new ArgumentException($"Expected room for {Classes} probabilities, got {probabilities.Length}.", nameof(probabilities));
        Features(Whitening, embedding, whitened);
        int d = Dimensions;
        float inv = (float)(1.0 / Temperature), max = float.NegativeInfinity;
        for (int c = 0; c < Classes; c++)
        {
            float z = (Kernels.Dot(_weights.AsSpan(c * d, d), whitened) + _bias[c]) * inv;
            probabilities[c] = z;
            if (z > max) max = z;
        }
        float sum = 0;
        for (int c = 0; c < Classes; c++) { probabilities[c] = MathF.Exp(probabilities[c] - max); sum += probabilities[c]; }
        for (int c = 0; c < Classes; c++) probabilities[c] /= sum;
    }

    /// <summary>
    /// Writes each task's score into <paramref name="scores"/> (<see cref="TaskCount"/> wide) and returns the
    /// look-alike class's probability (0 without one); <paramref name="bestTaskProbability"/> receives the highest task
    /// probability. The score is p^α · max(0, c)^(1 − α) with α = <see cref="ProbabilityWeight"/>; by default √(p · max(0, c)),
    /// the geometric mean of the task's probability p and the cosine c of the (unwhitened) embedding to the task's centroid,
    /// the normalised mean of its phrase embeddings: a task must be both the head's choice and close to its own phrases
    /// to score high. On CLINC150 this kept out-of-scope queries out better than p alone or the whitened cosine (see
    /// docs/clinc150-strategies.md); <c>tune</c> can choose α.
    /// </summary>
    /// <exception cref="ArgumentException">A span has the wrong width.</exception>
    public float ScoreTasks(ReadOnlySpan<float> embedding, Span<float> scores, out float bestTaskProbability)
    {
        if (scores.Length != TaskCount) throw new ArgumentException($"Expected room for {TaskCount} scores, got {scores.Length}.", nameof(scores));
        int d = Dimensions;
        Span<float> p = Classes <= 4096 ? stackalloc float[Classes] : new float[Classes];
        Span<float> f = d <= 1024 ? stackalloc float[d] : new float[d];
        Predict(embedding, p, f);
        bestTaskProbability = 0;
        for (int t = 0; t < TaskCount; t++)
        {
            bestTaskProbability = Math.Max(bestTaskProbability, p[t]);
            float c = Kernels.Dot(embedding, _centroids.AsSpan(t * d, d));
            scores[t] = ProbabilityWeight == DefaultProbabilityWeight
                ? MathF.Sqrt(p[t] * Math.Max(0f, c))
                : (float)(Math.Pow(p[t], ProbabilityWeight) * Math.Pow(Math.Max(0f, c), 1 - ProbabilityWeight));
        }
        return HasRejectClass ? p[TaskCount] : 0f;
    }

    /// <summary>
    /// Serialises the head (little-endian): magic <c>TPHD</c>, u16 version 1, i32 classes, i32 look-alike flag,
    /// f64 L2, f64 temperature, i32 iterations, f64 training loss, the 32-byte training digest (length-prefixed), the
    /// whitening's payload (as in <see cref="Whitening.ToBytes"/>, without its magic and hash), the weights
    /// (f32 × classes × d, row-major), the biases (f32 × classes), the task centroids (f32 × tasks × d), and a
    /// SHA-256 of all of it. A head whose <see cref="ProbabilityWeight"/> is not 0.5 is written as version 2, with the
    /// weight (f64) after the temperature.
    /// </summary>
    public byte[] ToBytes()
    {
        bool weighted = ProbabilityWeight != DefaultProbabilityWeight;
        var w = new ScorerBytes.Writer(Magic, weighted ? WeightedFormatVersion : FormatVersion);
        w.Int32(Classes);
        w.Int32(HasRejectClass ? 1 : 0);
        w.Double(L2);
        w.Double(Temperature);
        if (weighted) w.Double(ProbabilityWeight);
        w.Int32(Iterations);
        w.Double(TrainingLoss);
        w.Bytes(Convert.FromHexString(TrainingDigest));
        Whitening.WriteTo(w);
        w.Floats(_weights);
        w.Floats(_bias);
        w.Floats(_centroids);
        return w.Finish();
    }

    /// <summary>Reads a head written by <see cref="ToBytes"/>.</summary>
    /// <exception cref="FormatException">The bytes are not a task head of this format version, are truncated, inconsistent, or fail their SHA-256 check.</exception>
    public static TaskHead FromBytes(ReadOnlySpan<byte> bytes)
    {
        ushort version = bytes.Length >= 6 && System.Buffers.Binary.BinaryPrimitives.ReadUInt16LittleEndian(bytes[4..]) == WeightedFormatVersion
            ? WeightedFormatVersion : FormatVersion;
        var r = new ScorerBytes.Reader(bytes, Magic, version, "task head");
        int classes = r.Int32(), flag = r.Int32();
        double l2 = r.Double(), temperature = r.Double();
        double weight = version == WeightedFormatVersion ? r.Double() : DefaultProbabilityWeight;
        if (!(weight is >= 0 and <= 1)) throw new FormatException($"The task head data has an invalid probability weight {weight}; it must lie in [0, 1].");
        int iterations = r.Int32();
        double loss = r.Double();
        if (flag is not (0 or 1) || !(l2 > 0) || !(temperature is >= 0.01 and <= 100) || iterations < 0)
            throw new FormatException($"The task head data has an invalid header (look-alike flag {flag}, L2 {l2}, temperature {temperature}, iterations {iterations}).");
        string digest = Convert.ToHexStringLower(r.Bytes());
        var whitening = Whitening.ReadFrom(ref r);
        if (classes != whitening.TaskCount + flag)
            throw new FormatException($"The task head data has {classes} classes but its whitening has {whitening.TaskCount} tasks and the look-alike flag is {flag}.");
        var weights = r.Floats(checked(classes * whitening.Dimensions));
        var bias = r.Floats(classes);
        var centroids = r.Floats(checked(whitening.TaskCount * whitening.Dimensions));
        r.End();
        return new TaskHead(whitening, flag == 1, l2, temperature, iterations, loss, digest, weights, bias, centroids, weight);
    }

    /// <summary>
    /// Cross-entropy of a linear softmax model plus an L2 penalty, with its gradient. Logits are computed sample by
    /// sample in parallel, the weight gradient Rᵀ X class by class in parallel, each value by one thread in a fixed
    /// order, so the result does not depend on scheduling.
    /// </summary>
    private sealed class Objective
    {
        private readonly float[] _x, _xt; // n × d and its transpose d × n.
        private readonly int[] _labels;
        private readonly int _n, _d, _k;
        private readonly double _l2;
        private readonly float[] _w;
        private readonly float[] _rt;      // Residuals p − y, k × n.
        private readonly double[] _loss;
        private readonly float[] _grad;
        private double[] _bias = [];

        public Objective(float[] x, int[] labels, int n, int d, int k, double l2)
        {
            (_x, _labels, _n, _d, _k, _l2) = (x, labels, n, d, k, l2);
            _xt = new float[d * n];
            for (int i = 0; i < n; i++)
                for (int a = 0; a < d; a++) _xt[a * n + i] = x[i * d + a];
            _w = new float[k * d];
            _rt = new float[k * n];
            _loss = new double[n];
            _grad = new float[k * d];
        }

        public double Evaluate(ReadOnlySpan<double> theta, Span<double> gradient)
        {
            int n = _n, d = _d, k = _k;
            for (int i = 0; i < k * d; i++) _w[i] = (float)theta[i];
            _bias = theta.Slice(k * d, k).ToArray();
            Parallel.For(0, n, Forward);
            Parallel.For(0, k, Backward);
            double loss = 0, penalty = 0;
            for (int i = 0; i < n; i++) loss += _loss[i];
            loss /= n;
            for (int i = 0; i < k * d; i++)
            {
                penalty += theta[i] * theta[i];
                gradient[i] = _grad[i] / (double)n + _l2 * theta[i];
            }
            for (int c = 0; c < k; c++)
            {
                double g = 0;
                var r = _rt.AsSpan(c * n, n);
                for (int i = 0; i < n; i++) g += r[i];
                gradient[k * d + c] = g / n;
            }
            return loss + 0.5 * _l2 * penalty;
        }

        private void Forward(int i)
        {
            int n = _n, d = _d, k = _k;
            var row = _x.AsSpan(i * d, d);
            Span<float> zf = stackalloc float[4];
            var z = k <= 4096 ? stackalloc double[k] : new double[k];
            double max = double.NegativeInfinity;
            for (int c = 0; c < k; c += 4)
            {
                int count = Math.Min(4, k - c);
                Kernels.Dot4(row, _w, c, count, zf);
                for (int j = 0; j < count; j++)
                {
                    z[c + j] = zf[j] + _bias[c + j];
                    if (z[c + j] > max) max = z[c + j];
                }
            }
            double sum = 0;
            for (int c = 0; c < k; c++) sum += Math.Exp(z[c] - max);
            double logSum = max + Math.Log(sum);
            int label = _labels[i];
            for (int c = 0; c < k; c++) _rt[c * n + i] = (float)(Math.Exp(z[c] - logSum) - (c == label ? 1 : 0));
            _loss[i] = logSum - z[label];
        }

        private void Backward(int c)
        {
            int n = _n, d = _d;
            var r = _rt.AsSpan(c * n, n);
            var g = _grad.AsSpan(c * d, d);
            for (int a = 0; a < d; a += 4)
            {
                int count = Math.Min(4, d - a);
                Kernels.Dot4(r, _xt, a, count, g.Slice(a, count));
            }
        }
    }
}
