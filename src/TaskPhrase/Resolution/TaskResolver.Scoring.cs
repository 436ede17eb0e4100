using System.Buffers;
using System.Numerics.Tensors;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace TaskPhrase.Resolution;

public sealed partial class TaskResolver
{
    /// <summary>Widest embedding kept on the stack during a resolve; wider ones go to the heap.</summary>
    private const int MaxStackDimensions = 2048;

    /// <summary>Most tasks whose scores and nearest rows are kept on the stack; more are pooled.</summary>
    private const int MaxStackTasks = 256;

    /// <summary>
    /// Step 5: scores every task under the state's strategy into <paramref name="scores"/> and each task's nearest
    /// approved phrase row into <paramref name="rows"/>, or -1 where the strategy did not need it (both as long as the
    /// registry has tasks; every entry written; <see cref="TopCandidates"/> fills in the rows of the tasks it shows).
    /// </summary>
    /// <returns>The head's look-alike probability when it is at least the best task's (strategy head), else null.</returns>
    /// <remarks>
    /// <paramref name="count"/> is the number of candidates the caller will show: with the phrase screen, only tasks that
    /// can be among them are scored exactly; the others get an upper bound below those (row <see cref="NotScored"/>).
    /// </remarks>
    private float? ScoreTasks(ResolverState state, ReadOnlySpan<float> vector, int count, Span<float> scores, Span<int> rows)
    {
        if (state.Screen is { } screen && _options.PhraseScreen && Screened(state, screen, vector, count, scores, rows)) return null;
        int dims = state.Dimensions, taskCount = state.TaskCount, rowCount = state.PhraseTask.Length;
        bool topK = state.Scoring == ScoringStrategy.TopK;
        float[]? sims = topK ? ArrayPool<float>.Shared.Rent(Math.Max(1, rowCount)) : null;
        try
        {
            // Centroid, whitened and head scores need no phrase scores: their nearest phrases (shown in the
            // candidates, compared with the look-alikes, the source of FiLM conditioning) are found afterwards for
            // the few tasks shown, by the same scan restricted to the task's rows (see NearestRow).
            if (state.Scoring is ScoringStrategy.Centroid or ScoringStrategy.Whitened or ScoringStrategy.Head)
                rows.Fill(-1);
            else
                ScanPhrases(state, vector, scores, rows, sims);
            switch (state.Scoring)
            {
                case ScoringStrategy.BestPhrase:
                    return null;
                case ScoringStrategy.Centroid:
                    for (int t = 0; t < taskCount; t++) scores[t] = TensorPrimitives.Dot(vector, state.Centroids.AsSpan(t * dims, dims));
                    return null;
                case ScoringStrategy.Blend:
                    for (int t = 0; t < taskCount; t++)
                    {
                        float c = TensorPrimitives.Dot(vector, state.Centroids.AsSpan(t * dims, dims));
                        scores[t] = state.BlendCentroidWeight * c + (1 - state.BlendCentroidWeight) * scores[t];
                    }
                    return null;
                case ScoringStrategy.TopK:
                    ScoreTopK(state, sims!.AsSpan(0, rowCount), scores);
                    return null;
                case ScoringStrategy.Whitened:
                    state.Whitening!.ScoreTasks(vector, scores);
                    return null;
                case ScoringStrategy.Head:
                    float reject = state.Head!.ScoreTasks(vector, scores, out float bestProbability);
                    return state.Head.HasRejectClass && reject >= bestProbability ? reject : null;
                default:
                    throw new InvalidOperationException($"Unknown scoring strategy {state.Scoring}.");
            }
        }
        finally
        {
            if (sims is not null) ArrayPool<float>.Shared.Return(sims);
        }
    }

    /// <summary>
    /// Each task's best phrase score into <paramref name="scores"/> and its row into <paramref name="rows"/> (the first
    /// row of the highest score); every phrase score into <paramref name="sims"/> when given.
    /// </summary>
    private static void ScanPhrases(ResolverState state, ReadOnlySpan<float> vector, Span<float> scores, Span<int> rows, float[]? sims)
    {
        int dims = state.Dimensions, rowCount = state.PhraseTask.Length;
        scores.Fill(float.NegativeInfinity);
        rows.Clear();
        var phrases = state.Phrases.AsSpan();
        var phraseTask = state.PhraseTask;
        for (int r = 0; r < rowCount; r++)
        {
            float s = TensorPrimitives.Dot(vector, phrases.Slice(r * dims, dims));
            if (sims is not null) sims[r] = s;
            int t = phraseTask[r];
            if (s > scores[t]) { scores[t] = s; rows[t] = r; }
        }
    }

    /// <summary>Row mark of a task whose score is only an upper bound from the phrase screen (its row not looked up).</summary>
    private const int NotScored = -2;

    /// <summary>
    /// Task <paramref name="task"/>'s nearest phrase row, exactly as <see cref="ScanPhrases"/> finds it: the first row of
    /// the highest score, row 0 when no score exceeds -∞.
    /// </summary>
    private static int NearestRow(ResolverState state, ReadOnlySpan<float> vector, int task)
    {
        ExactBest(state, vector, task, out int row);
        return row;
    }

    /// <summary>Task <paramref name="task"/>'s best phrase score and row, exactly as <see cref="ScanPhrases"/> computes them.</summary>
    private static float ExactBest(ResolverState state, ReadOnlySpan<float> vector, int task, out int row)
    {
        int dims = state.Dimensions;
        row = 0;
        float best = float.NegativeInfinity;
        var phrases = state.Phrases.AsSpan();
        for (int r = state.TaskRowStart[task]; r < state.TaskRowStart[task + 1]; r++)
        {
            float s = TensorPrimitives.Dot(vector, phrases.Slice(r * dims, dims));
            if (s > best) { best = s; row = r; }
        }
        return best;
    }

    /// <summary>
    /// Best-phrase (and blend) scoring through the 8-bit screen: bounds every task's score, then scores exactly (same
    /// arithmetic as <see cref="ScanPhrases"/>) every task whose upper bound reaches the <paramref name="count"/>-th
    /// largest lower bound. The <paramref name="count"/> best tasks are among those, so candidates, order and scores
    /// are exactly those of the full scan. Every other task's exact score is below all of them; it gets the largest
    /// float not above its upper bound and row <see cref="NotScored"/> (the anchor rule scores it exactly when it
    /// needs it). False, with nothing written, when the screen cannot bound this query (not finite).
    /// </summary>
    private static bool Screened(ResolverState state, PhraseScreen screen, ReadOnlySpan<float> vector, int count, Span<float> scores, Span<int> rows)
    {
        int taskCount = state.TaskCount, dims = state.Dimensions;
        count = Math.Clamp(count, 1, taskCount);
        bool blend = state.Scoring == ScoringStrategy.Blend;
        double w = state.BlendCentroidWeight;
        double[] lowerArray = ArrayPool<double>.Shared.Rent(taskCount), upperArray = ArrayPool<double>.Shared.Rent(taskCount);
        double[]? rowUpperArray = null;
        try
        {
            var lower = lowerArray.AsSpan(0, taskCount);
            var upper = upperArray.AsSpan(0, taskCount);
            if (state.Scoring == ScoringStrategy.TopK)
            {
                if (!TopKBounds(state, screen, vector, lower, upper)) return false;
            }
            else
            {
                rowUpperArray = ArrayPool<double>.Shared.Rent(screen.Rows);
                if (!screen.Bounds(vector, state.PhraseTask, lower, upper, rowUpperArray.AsSpan(0, screen.Rows))) return false;
            }
            if (blend)
            {
                // Blend = w·c + (1 − w)·best with c the exact centroid cosine: the best-phrase bounds carry over, widened by
                // 10⁻⁶ for the float rounding of the two products and their sum (at most a few 10⁻⁸ here).
                for (int t = 0; t < taskCount; t++)
                {
                    double c = TensorPrimitives.Dot(vector, state.Centroids.AsSpan(t * dims, dims));
                    lower[t] = w * c + (1 - w) * lower[t] - 1e-6;
                    upper[t] = w * c + (1 - w) * upper[t] + 1e-6;
                }
            }
            double threshold = KthLargest(lower, count);
            if (!double.IsFinite(threshold)) return false;
            for (int t = 0; t < taskCount; t++)
            {
                if (upper[t] >= threshold)
                {
                    scores[t] = rowUpperArray is null ? ExactScore(state, vector, t, out rows[t]) : ExactScore(state, vector, t, rowUpperArray, out rows[t]);
                    continue;
                }
                float bound = (float)upper[t];
                scores[t] = bound > upper[t] ? MathF.BitDecrement(bound) : bound;
                rows[t] = NotScored;
            }
            return true;
        }
        finally
        {
            ArrayPool<double>.Shared.Return(lowerArray);
            ArrayPool<double>.Shared.Return(upperArray);
            if (rowUpperArray is not null) ArrayPool<double>.Shared.Return(rowUpperArray);
        }
    }

    /// <summary>
    /// Top-k bounds per task from the screen's row bounds: the mean of the task's k largest row lower bounds is at most
    /// the mean of its k best exact scores, which is at most the mean of its k largest row upper bounds (whatever rows
    /// the exact k best are); widened by 10⁻⁶ for the float rounding of the exact mean.
    /// </summary>
    private static bool TopKBounds(ResolverState state, PhraseScreen screen, ReadOnlySpan<float> vector, Span<double> lower, Span<double> upper)
    {
        int rows = screen.Rows;
        double[] work = ArrayPool<double>.Shared.Rent(Math.Max(1, 2 * rows));
        try
        {
            var approx = work.AsSpan(0, rows);
            var bound = work.AsSpan(rows, rows);
            if (!screen.RowBounds(vector, approx, bound)) return false;
            // Per task, the k largest row upper bounds (lane 0) and row lower bounds (lane 1), kept in descending order.
            Span<Vector128<double>> top = stackalloc Vector128<double>[Math.Min(state.TopK, MaxStackTopK)];
            for (int t = 0; t < state.TaskCount; t++)
            {
                int start = state.TaskRowStart[t], end = state.TaskRowStart[t + 1];
                int k = Math.Min(state.TopK, end - start);
                if (k == 0) { lower[t] = upper[t] = double.NegativeInfinity; continue; }
                if (k > top.Length) return false; // an unusually large k: scan everything instead
                var sum = k <= 4 ? SumOfLargestFew(approx, bound, start, end, k) : SumOfLargest(top[..k], approx, bound, start, end);
                upper[t] = sum.GetElement(0) / k + 1e-6;
                lower[t] = sum.GetElement(1) / k - 1e-6;
            }
            return true;
        }
        finally
        {
            ArrayPool<double>.Shared.Return(work);
        }
    }

    /// <summary>Largest k through the screen; a larger top-k scans every phrase.</summary>
    private const int MaxStackTopK = 64;

    /// <summary>
    /// Σ of the k largest row upper bounds (lane 0) and of the k largest row lower bounds (lane 1) of rows
    /// <paramref name="start"/> to <paramref name="end"/>, largest first (<see cref="InsertLargest"/>).
    /// </summary>
    private static Vector128<double> SumOfLargest(Span<Vector128<double>> top, ReadOnlySpan<double> approx, ReadOnlySpan<double> bound, int start, int end)
    {
        top.Fill(Vector128.Create(double.NegativeInfinity));
        for (int r = start; r < end; r++)
            InsertLargest(top, Vector128.Create(approx[r] + bound[r], approx[r] - bound[r]));
        var sum = Vector128<double>.Zero;
        foreach (var v in top) sum += v;
        return sum;
    }

    /// <summary>
    /// <see cref="SumOfLargest"/> for k ≤ 4 (the usual top-k) with the list in registers: the same compare-exchanges
    /// and the same sum, largest first, so the same doubles.
    /// </summary>
    private static Vector128<double> SumOfLargestFew(ReadOnlySpan<double> approx, ReadOnlySpan<double> bound, int start, int end, int k)
    {
        var t0 = Vector128.Create(double.NegativeInfinity);
        Vector128<double> t1 = t0, t2 = t0, t3 = t0;
        for (int r = start; r < end; r++)
        {
            var v = Vector128.Create(approx[r] + bound[r], approx[r] - bound[r]);
            (t0, v) = (MaxOf(t0, v), MinOf(t0, v));
            if (k > 1) (t1, v) = (MaxOf(t1, v), MinOf(t1, v));
            if (k > 2) (t2, v) = (MaxOf(t2, v), MinOf(t2, v));
            if (k > 3) t3 = MaxOf(t3, v);
        }
        var sum = Vector128<double>.Zero + t0;
        if (k > 1) sum += t1;
        if (k > 2) sum += t2;
        if (k > 3) sum += t3;
        return sum;
    }

    private static Vector128<double> MaxOf(Vector128<double> a, Vector128<double> b) => Sse2.IsSupported ? Sse2.Max(a, b) : Vector128.Max(a, b);

    private static Vector128<double> MinOf(Vector128<double> a, Vector128<double> b) => Sse2.IsSupported ? Sse2.Min(a, b) : Vector128.Min(a, b);

    /// <summary>
    /// Keeps the <c>top.Length</c> largest values seen in each lane, in descending order, without branches on the values
    /// (a compare-exchange down the list; the screen's bounds are finite): which rows rank is unpredictable, so a branchy
    /// insertion would mispredict on most rows.
    /// </summary>
    private static void InsertLargest(Span<Vector128<double>> top, Vector128<double> v)
    {
        for (int j = 0; j < top.Length; j++)
        {
            var kept = top[j];
            top[j] = MaxOf(kept, v);
            v = MinOf(kept, v);
        }
    }

    /// <summary>
    /// Task <paramref name="task"/>'s exact score under a screened strategy (best phrase, blend or top-k) and its nearest
    /// row, with the same arithmetic as the full scan in <see cref="ScoreTasks"/>.
    /// </summary>
    private static float ExactScore(ResolverState state, ReadOnlySpan<float> vector, int task, out int row)
    {
        float best = ExactBest(state, vector, task, out row);
        if (state.Scoring == ScoringStrategy.TopK) return ExactTopK(state, vector, task);
        if (state.Scoring != ScoringStrategy.Blend) return best;
        float c = TensorPrimitives.Dot(vector, state.Centroids.AsSpan(task * state.Dimensions, state.Dimensions));
        return state.BlendCentroidWeight * c + (1 - state.BlendCentroidWeight) * best;
    }

    /// <summary>
    /// <see cref="ExactScore(ResolverState, ReadOnlySpan{float}, int, out int)"/> for best-phrase and blend scoring with
    /// the screen's row upper bounds: the same best score and row as <see cref="ExactBest"/>, but a row whose upper bound
    /// is below the best exact score found so far cannot reach it (nor tie it) and is not scored. The row with the
    /// largest upper bound goes first, so usually one or two of a task's rows are scored.
    /// </summary>
    private static float ExactScore(ResolverState state, ReadOnlySpan<float> vector, int task, ReadOnlySpan<double> rowUpper, out int row)
    {
        int dims = state.Dimensions, start = state.TaskRowStart[task], end = state.TaskRowStart[task + 1];
        var phrases = state.Phrases.AsSpan();
        row = 0;
        float best = float.NegativeInfinity;
        if (end > start)
        {
            int first = start;
            for (int r = start + 1; r < end; r++) if (rowUpper[r] > rowUpper[first]) first = r;
            best = TensorPrimitives.Dot(vector, phrases.Slice(first * dims, dims));
            row = first;
            for (int r = start; r < end; r++)
            {
                if (r == first || rowUpper[r] < best) continue;
                float s = TensorPrimitives.Dot(vector, phrases.Slice(r * dims, dims));
                // The first row of the highest score, as the full scan keeps it.
                if (s > best || (s == best && r < row)) { best = s; row = r; }
            }
        }
        if (state.Scoring != ScoringStrategy.Blend) return best;
        float c = TensorPrimitives.Dot(vector, state.Centroids.AsSpan(task * dims, dims));
        return state.BlendCentroidWeight * c + (1 - state.BlendCentroidWeight) * best;
    }

    /// <summary>The <paramref name="k"/>-th largest value (1-based), in one pass keeping the k largest.</summary>
    private static double KthLargest(ReadOnlySpan<double> values, int k)
    {
        Span<double> top = k <= 256 ? stackalloc double[k] : new double[k];
        top.Fill(double.NegativeInfinity);
        foreach (double v in values)
        {
            if (!(v > top[^1])) continue;
            int i = k - 1;
            while (i > 0 && v > top[i - 1]) { top[i] = top[i - 1]; i--; }
            top[i] = v;
        }
        return top[^1];
    }

    /// <summary>One task's top-k score, exactly as <see cref="ScoreTopK"/> computes it (same dot products, sort and sum).</summary>
    private static float ExactTopK(ResolverState state, ReadOnlySpan<float> vector, int task)
    {
        int start = state.TaskRowStart[task], end = state.TaskRowStart[task + 1], n = end - start, dims = state.Dimensions;
        float[] sims = ArrayPool<float>.Shared.Rent(Math.Max(1, n));
        try
        {
            var slice = sims.AsSpan(0, n);
            for (int r = start; r < end; r++) slice[r - start] = TensorPrimitives.Dot(vector, state.Phrases.AsSpan(r * dims, dims));
            slice.Sort();
            int k = Math.Min(state.TopK, n);
            return k == 0 ? float.NegativeInfinity : TensorPrimitives.Sum(slice[(n - k)..]) / k;
        }
        finally
        {
            ArrayPool<float>.Shared.Return(sims);
        }
    }

    /// <summary>Top-k scoring: the mean of each task's <see cref="ResolverOptions.TopK"/> best phrase scores.</summary>
    private void ScoreTopK(ResolverState state, ReadOnlySpan<float> sims, Span<float> scores)
    {
        int rowCount = sims.Length;
        float[] sorted = ArrayPool<float>.Shared.Rent(Math.Max(1, rowCount));
        try
        {
            int start = 0;
            for (int t = 0; t < state.TaskCount; t++)
            {
                int end = start;
                while (end < rowCount && state.PhraseTask[end] == t) end++;
                var slice = sorted.AsSpan(0, end - start);
                sims[start..end].CopyTo(slice);
                slice.Sort();
                int k = Math.Min(state.TopK, slice.Length);
                scores[t] = k == 0 ? float.NegativeInfinity : TensorPrimitives.Sum(slice[(slice.Length - k)..]) / k;
                start = end;
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(sorted);
        }
    }

    /// <summary>
    /// The <paramref name="count"/> best candidates (fewer when the registry has fewer tasks), highest score first,
    /// ties to the earlier task, each with its task's nearest approved phrase (its row found now when
    /// <paramref name="rows"/> holds -1); <paramref name="best"/> receives the first one's task position.
    /// </summary>
    private static TaskCandidate[] TopCandidates(ResolverState state, ReadOnlySpan<float> vector, ReadOnlySpan<float> scores, Span<int> rows, int count, out int best)
    {
        count = Math.Min(count, scores.Length);
        Span<int> top = count <= MaxStackTasks ? stackalloc int[count] : new int[count];
        SelectTop(scores, top);
        var candidates = new TaskCandidate[count];
        for (int k = 0; k < count; k++)
        {
            if (rows[top[k]] < 0) rows[top[k]] = NearestRow(state, vector, top[k]);
            var task = state.Registry.Tasks[top[k]];
            candidates[k] = new TaskCandidate(task.Id, task.Phrases[state.PhraseOrdinal[rows[top[k]]]], scores[top[k]]);
        }
        best = count > 0 ? top[0] : -1;
        return candidates;
    }

    /// <summary>
    /// The positions of the <paramref name="top"/>.Length highest <paramref name="scores"/>, best first, ties (and NaN,
    /// lowest) in the order of <see cref="float.CompareTo(float)"/> and then of position: what a stable descending sort
    /// (<c>OrderByDescending(score).ThenBy(position)</c>) gives, in one pass and without allocating.
    /// </summary>
    internal static void SelectTop(ReadOnlySpan<float> scores, Span<int> top)
    {
        if (top.IsEmpty) return;
        int filled = 0;
        for (int t = 0; t < scores.Length; t++)
        {
            // A later position never beats an equal score, so it goes after the last strictly better one.
            if (filled == top.Length && scores[t].CompareTo(scores[top[^1]]) <= 0) continue;
            int i = Math.Min(filled, top.Length - 1);
            while (i > 0 && scores[t].CompareTo(scores[top[i - 1]]) > 0)
            {
                top[i] = top[i - 1];
                i--;
            }
            top[i] = t;
            if (filled < top.Length) filled++;
        }
    }

    /// <summary>Returns the pooled arrays (if any) that held the scores and rows of a registry of more than <see cref="MaxStackTasks"/> tasks.</summary>
    private static void ReturnPooled(float[]? scores, int[]? rows)
    {
        if (scores is not null) ArrayPool<float>.Shared.Return(scores);
        if (rows is not null) ArrayPool<int>.Shared.Return(rows);
    }
}
