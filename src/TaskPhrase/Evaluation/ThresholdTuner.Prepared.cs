namespace TaskPhrase.Evaluation;

public sealed partial class ThresholdTuner
{
    /// <summary>How a live probe counts when it is accepted.</summary>
    private enum LiveKind : byte
    {
        /// <summary>In-scope, best task is the expected one: accepted means correct.</summary>
        Correct,

        /// <summary>In-scope, best task is another one: accepted means wrong task.</summary>
        Wrong,

        /// <summary>Out-of-scope: accepted means false accept.</summary>
        OutOfScope,
    }

    /// <summary>A probe whose outcome depends on the thresholds (not exact, not guarded, has a best task).</summary>
    private readonly record struct LiveProbe(float Score, float Gap, LiveKind Kind, string Task);

    /// <summary>The suite sorted once for the sweeps: constant contributions plus live probes by descending score.</summary>
    private sealed class Prepared
    {
        public int InScope { get; private init; }
        public int OutOfScope { get; private init; }

        /// <summary>In-scope exact matches of the expected task (accepted whatever the thresholds).</summary>
        public int ConstCorrect { get; private init; }

        /// <summary>In-scope exact matches of another task.</summary>
        public int ConstWrong { get; private init; }

        /// <summary>Out-of-scope exact matches.</summary>
        public int ConstFalseAccept { get; private init; }

        /// <summary>Live probes, best score descending (ties in input order).</summary>
        public LiveProbe[] Live { get; private init; } = [];

        /// <summary>Exclusive end (into <see cref="Live"/>) of each group of equal scores.</summary>
        public int[] GroupEnd { get; private init; } = [];

        /// <summary>Accept candidates: index k lets the first k groups pass; length groups + 1, decreasing.</summary>
        public float[] AcceptCandidates { get; private init; } = [];

        public static Prepared Create(IReadOnlyList<ScoredProbe> probes)
        {
            Validate(probes);
            int inScope = 0, outOfScope = 0, constCorrect = 0, constWrong = 0, constFa = 0;
            var live = new List<LiveProbe>(probes.Count);
            foreach (var p in probes)
            {
                bool isIn = p.Probe.IsInScope;
                if (isIn) inScope++; else outOfScope++;
                if (p.ExactMatch)
                {
                    if (!isIn) constFa++;
                    else if (p.BestTask == p.Probe.Expect) constCorrect++;
                    else constWrong++;
                    continue;
                }
                if (p.GuardRejected || p.BestTask is null) continue;
                float gap = p.RunnerUpTask is null ? float.PositiveInfinity : p.BestScore - p.RunnerUpScore;
                var kind = !isIn ? LiveKind.OutOfScope : p.BestTask == p.Probe.Expect ? LiveKind.Correct : LiveKind.Wrong;
                live.Add(new LiveProbe(p.BestScore, gap, kind, p.BestTask));
            }
            var sorted = live.ToArray();
            // Stable sort, descending by score: keeps the input order among equal scores.
            var order = Enumerable.Range(0, sorted.Length).ToArray();
            Array.Sort(order, (a, b) => sorted[b].Score.CompareTo(sorted[a].Score) is var c && c != 0 ? c : a.CompareTo(b));
            var byScore = order.Select(i => sorted[i]).ToArray();
            var ends = GroupEnds(byScore.Select(l => l.Score).ToArray());
            return new Prepared
            {
                InScope = inScope,
                OutOfScope = outOfScope,
                ConstCorrect = constCorrect,
                ConstWrong = constWrong,
                ConstFalseAccept = constFa,
                Live = byScore,
                GroupEnd = ends,
                AcceptCandidates = CandidatesFor(byScore.Select(l => l.Score).ToArray(), ends),
            };
        }

        /// <summary>Checks every probe, naming the first bad one.</summary>
        public static void Validate(IReadOnlyList<ScoredProbe> probes)
        {
            for (int i = 0; i < probes.Count; i++)
            {
                var p = probes[i] ?? throw new ArgumentException($"Scored probe {i} is null.", nameof(probes));
                if (p.Probe is null) throw new ArgumentException($"Scored probe {i} has no probe case.", nameof(probes));
                if (p.ExactMatch && p.BestTask is null)
                {
                    throw new ArgumentException($"Scored probe {i} (\"{p.Probe.Utterance}\", line {p.Probe.Line}) is an exact match but names no best task.", nameof(probes));
                }
                if (p.ExactMatch || p.GuardRejected || p.BestTask is null) continue;
                if (!float.IsFinite(p.BestScore))
                {
                    throw new ArgumentException($"Scored probe {i} (\"{p.Probe.Utterance}\", line {p.Probe.Line}) has a non-finite best score {p.BestScore}.", nameof(probes));
                }
                if (p.RunnerUpTask is not null)
                {
                    if (!float.IsFinite(p.RunnerUpScore))
                    {
                        throw new ArgumentException($"Scored probe {i} (\"{p.Probe.Utterance}\", line {p.Probe.Line}) has a non-finite runner-up score {p.RunnerUpScore}.", nameof(probes));
                    }
                    if (p.RunnerUpScore > p.BestScore)
                    {
                        throw new ArgumentException($"Scored probe {i} (\"{p.Probe.Utterance}\", line {p.Probe.Line}) has a runner-up score {p.RunnerUpScore} above its best score {p.BestScore}; " +
                            "best and runner-up are swapped.", nameof(probes));
                    }
                }
            }
        }
    }

    /// <summary>Exclusive ends of the runs of equal values in a sorted array.</summary>
    private static int[] GroupEnds(float[] sortedScores)
    {
        var ends = new List<int>();
        for (int i = 1; i <= sortedScores.Length; i++)
        {
            if (i == sortedScores.Length || sortedScores[i] != sortedScores[i - 1]) ends.Add(i);
        }
        return ends.ToArray();
    }

    /// <summary>
    /// Accept thresholds for each prefix of groups of a descending score array: index 0 lies just above the
    /// highest score, index k (k ≥ 1) in (score of group k+1, score of group k], the last just below the lowest.
    /// </summary>
    private static float[] CandidatesFor(float[] descendingScores, int[] groupEnds)
    {
        int g = groupEnds.Length;
        var result = new float[g + 1];
        if (g == 0)
        {
            result[0] = 0.5f;
            return result;
        }
        float max = descendingScores[0], min = descendingScores[^1];
        result[0] = Between(max, Math.Max(MathF.BitIncrement(max), max + EndStep));
        for (int k = 1; k < g; k++)
        {
            float hi = descendingScores[groupEnds[k - 1] - 1];
            float lo = descendingScores[groupEnds[k] - 1];
            result[k] = Between(lo, hi);
        }
        result[g] = Between(Math.Min(MathF.BitDecrement(min), min - EndStep), min);
        return result;
    }

    /// <summary>Width of the interval used for "just above the highest" and "just below the lowest" score.</summary>
    private const float EndStep = 0.01f;

    /// <summary>
    /// A value t with lo &lt; t ≤ hi (so that exactly the scores ≥ hi pass a "score ≥ t" test): the midpoint, or a
    /// shorter decimal near it (within the middle half of the interval) so written thresholds stay readable.
    /// The midpoint is taken between the shortest decimal forms of the two floats (0.65 and 0.7 give 0.675,
    /// written 0.68), as a person reading the scores would.
    /// </summary>
    internal static float Between(float lo, float hi)
    {
        if (!(lo < hi)) throw new ArgumentException($"Empty interval ({lo}, {hi}].");
        if (Math.Abs(lo) < 1e6f && Math.Abs(hi) < 1e6f)
        {
            // float → decimal keeps 7 significant digits: the shortest decimal form for ordinary values.
            decimal dlo = (decimal)lo, dhi = (decimal)hi;
            decimal mid = (dlo + dhi) / 2, quarter = (dhi - dlo) / 4;
            for (int digits = 1; digits <= 8; digits++)
            {
                decimal rounded = Math.Round(mid, digits, MidpointRounding.AwayFromZero);
                float r = (float)rounded;
                if (r > lo && r <= hi && Math.Abs(rounded - mid) <= quarter) return r;
            }
        }
        float m = (float)(((double)lo + hi) / 2);
        return m > lo && m <= hi ? m : hi;
    }
}
