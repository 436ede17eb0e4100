using TaskPhrase.Resolution;
using ResolutionResult = TaskPhrase.Resolution.Resolution;

namespace TaskPhrase.Evaluation;

/// <summary>
/// Turns a probe suite and its resolutions into an <see cref="AuditReport"/>. Usable from code and from the CLI alike.
/// </summary>
/// <remarks>Pure and thread-safe: the inputs are only read.</remarks>
public static class AuditEvaluator
{
    /// <summary>The score used for a resolution that has none (e.g. empty input): below every cosine score.</summary>
    public const double NoScore = -1;

    /// <summary>
    /// Computes the audit report of <paramref name="probes"/>, where <paramref name="resolutions"/>[i] is the resolution
    /// of <paramref name="probes"/>[i].
    /// </summary>
    /// <param name="probes">The probes, e.g. <see cref="ProbeSuite.Cases"/>.</param>
    /// <param name="resolutions">One resolution per probe, in the same order.</param>
    /// <param name="context">What was audited and report options.</param>
    /// <returns>The report.</returns>
    /// <exception cref="ArgumentException">
    /// The lists differ in length; a resolution's utterance differs from its probe's; a resolution was made with another
    /// registry or model than <paramref name="context"/> names; an accepted resolution has no task; or a score is NaN.
    /// </exception>
    public static AuditReport Evaluate(IReadOnlyList<ProbeCase> probes, IReadOnlyList<ResolutionResult> resolutions, AuditContext context)
    {
        ArgumentNullException.ThrowIfNull(probes);
        ArgumentNullException.ThrowIfNull(resolutions);
        ArgumentNullException.ThrowIfNull(context);
        if (probes.Count != resolutions.Count)
            throw new ArgumentException($"There are {probes.Count} probes but {resolutions.Count} resolutions; pass exactly one resolution per probe, in probe order.", nameof(resolutions));

        var cases = new AuditCase[probes.Count];
        for (int i = 0; i < probes.Count; i++) cases[i] = ToCase(i, probes[i], resolutions[i], context);

        int inScope = 0, outOfScope = 0, correct = 0, wrongTask = 0, falseReject = 0, falseAccept = 0;
        int accepted = 0, rejected = 0, ambiguous = 0, exact = 0, truncated = 0;
        var byReason = AuditLabels.Reasons.ToDictionary(r => r, _ => 0);
        var oosCaught = AuditLabels.Reasons.ToDictionary(r => r, _ => 0);
        var inScopeRefused = AuditLabels.Reasons.ToDictionary(r => r, _ => 0);
        var inScopeScores = new List<double>();
        var outOfScopeScores = new List<double>();

        for (int i = 0; i < cases.Length; i++)
        {
            var c = cases[i];
            var r = resolutions[i];
            bool isIn = probes[i].IsInScope;
            if (r.ExactMatch) exact++;
            if (r.Truncated) truncated++;
            switch (c.Outcome)
            {
                case ResolutionOutcome.Accepted: accepted++; break;
                case ResolutionOutcome.Rejected: rejected++; break;
                default: ambiguous++; break;
            }
            if (c.Outcome != ResolutionOutcome.Accepted) byReason[c.Reason]++;

            if (isIn)
            {
                inScope++;
                inScopeScores.Add(c.Score);
                if (c.Outcome == ResolutionOutcome.Accepted)
                {
                    if (c.Got == c.Expected) correct++; else wrongTask++;
                }
                else
                {
                    falseReject++;
                    inScopeRefused[c.Reason]++;
                }
            }
            else
            {
                outOfScope++;
                outOfScopeScores.Add(c.Score);
                if (c.Outcome == ResolutionOutcome.Accepted) falseAccept++;
                else oosCaught[c.Reason]++;
            }
        }
        inScopeScores.Sort();
        outOfScopeScores.Sort();

        int n = context.WorstCaseCount;
        return new AuditReport
        {
            Context = context,
            Counts = new AuditCounts
            {
                Probes = cases.Length, InScope = inScope, OutOfScope = outOfScope,
                Accepted = accepted, Rejected = rejected, Ambiguous = ambiguous,
                ExactMatches = exact, Truncated = truncated, ByReason = byReason,
            },
            InScopeAccuracy = new RateEstimate(correct, inScope),
            WrongTaskRate = new RateEstimate(wrongTask, inScope),
            FalseRejectRate = new RateEstimate(falseReject, inScope),
            FalseAcceptRate = new RateEstimate(falseAccept, outOfScope),
            OosRecall = new RateEstimate(outOfScope - falseAccept, outOfScope),
            AmbiguityRate = new RateEstimate(ambiguous, cases.Length),
            Auroc = Statistics.Auroc(inScopeScores, outOfScopeScores),
            FprAt95Tpr = Statistics.FprAtTpr(inScopeScores, outOfScopeScores, 0.95),
            PerTask = PerTask(probes, cases, context),
            Confusion = Confusion(probes, cases, context),
            WorstFalseAccepts = Worst(cases, c => c.Expected == ProbeCase.Reject && c.Outcome == ResolutionOutcome.Accepted, highestFirst: true, n),
            WorstWrongTask = Worst(cases, c => c.Expected != ProbeCase.Reject && c.Outcome == ResolutionOutcome.Accepted && c.Got != c.Expected, highestFirst: true, n),
            WorstFalseRejects = Worst(cases, c => c.Expected != ProbeCase.Reject && c.Outcome != ResolutionOutcome.Accepted, highestFirst: false, n),
            Cases = cases,
            ByKind = ByKind(probes, cases),
            ByReason = AuditLabels.Reasons.Select(r => new ReasonBreakdown(r, oosCaught[r], inScopeRefused[r])).ToArray(),
            ThresholdSweep = Sweep(probes, cases, context),
            Roc = Statistics.RocCurve(inScopeScores, outOfScopeScores),
            InScopeScores = inScopeScores,
            OutOfScopeScores = outOfScopeScores,
        };
    }

    private static AuditCase ToCase(int index, ProbeCase probe, ResolutionResult r, AuditContext context)
    {
        ArgumentNullException.ThrowIfNull(probe, $"probes[{index}]");
        ArgumentNullException.ThrowIfNull(r, $"resolutions[{index}]");
        string where = probe.Line > 0 ? $"probe {index} (line {probe.Line})" : $"probe {index}";
        if (!string.Equals(r.Utterance, probe.Utterance, StringComparison.Ordinal))
            throw new ArgumentException($"Resolution {index} is for '{r.Utterance}' but {where} is '{probe.Utterance}'; pass the resolutions in probe order.", "resolutions");
        if (!string.Equals(r.RegistryHash, context.RegistryHash, StringComparison.Ordinal))
            throw new ArgumentException($"Resolution {index} was made with registry {r.RegistryHash}, but the audit context names registry {context.RegistryHash}; resolve all probes with the registry being audited.", "resolutions");
        if (!string.Equals(r.ModelId, context.ModelId, StringComparison.Ordinal))
            throw new ArgumentException($"Resolution {index} was made with model '{r.ModelId}', but the audit context names model '{context.ModelId}'; resolve all probes with the model being audited.", "resolutions");
        if (r.Score is { } s && float.IsNaN(s))
            throw new ArgumentException($"Resolution {index} ({where}) has a NaN score; scores must be numbers.", "resolutions");

        string? nearest = r.Task?.Id ?? (r.Candidates.Count > 0 ? r.Candidates[0].TaskId : null);
        string got;
        var reason = r.Reason;
        switch (r.Outcome)
        {
            case ResolutionOutcome.Accepted:
                got = r.Task?.Id ?? throw new ArgumentException($"Resolution {index} ({where}) is accepted but names no task.", "resolutions");
                reason = RejectionReason.None;
                break;
            case ResolutionOutcome.Ambiguous:
                got = ConfusionTable.Ambiguous;
                reason = RejectionReason.Ambiguous;
                break;
            default:
                got = ConfusionTable.Rejected;
                if (reason == RejectionReason.None)
                    throw new ArgumentException($"Resolution {index} ({where}) is rejected but gives no reason.", "resolutions");
                break;
        }
        return new AuditCase
        {
            Utterance = probe.Utterance,
            Expected = probe.Expect,
            Got = got,
            Outcome = r.Outcome,
            Nearest = nearest,
            Score = r.Score is { } score ? AuditContext.Exact(score) : NoScore,
            Reason = reason,
            Kind = probe.Kind,
            Line = probe.Line,
        };
    }

    /// <summary>Task ids in display order: the context's (registry order), then any other seen, ordinal.</summary>
    private static List<string> TaskOrder(IReadOnlyList<ProbeCase> probes, AuditCase[] cases, AuditContext context)
    {
        var order = new List<string>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var id in context.TaskIds)
            if (seen.Add(id)) order.Add(id);
        var others = new SortedSet<string>(StringComparer.Ordinal);
        foreach (var p in probes)
            if (p.IsInScope && !seen.Contains(p.Expect)) others.Add(p.Expect);
        foreach (var c in cases)
            if (c.Outcome == ResolutionOutcome.Accepted && !seen.Contains(c.Got)) others.Add(c.Got);
        order.AddRange(others);
        return order;
    }

    private static TaskMetrics[] PerTask(IReadOnlyList<ProbeCase> probes, AuditCase[] cases, AuditContext context)
    {
        var support = new Dictionary<string, int>(StringComparer.Ordinal);
        var predicted = new Dictionary<string, int>(StringComparer.Ordinal);
        var hits = new Dictionary<string, int>(StringComparer.Ordinal);
        foreach (var c in cases)
        {
            if (c.Expected != ProbeCase.Reject) support[c.Expected] = support.GetValueOrDefault(c.Expected) + 1;
            if (c.Outcome != ResolutionOutcome.Accepted) continue;
            predicted[c.Got] = predicted.GetValueOrDefault(c.Got) + 1;
            if (c.Got == c.Expected) hits[c.Got] = hits.GetValueOrDefault(c.Got) + 1;
        }
        return TaskOrder(probes, cases, context).Select(id =>
        {
            int s = support.GetValueOrDefault(id), p = predicted.GetValueOrDefault(id), h = hits.GetValueOrDefault(id);
            return new TaskMetrics(id, s, p, new RateEstimate(h, p), new RateEstimate(h, s));
        }).ToArray();
    }

    private static ConfusionTable Confusion(IReadOnlyList<ProbeCase> probes, AuditCase[] cases, AuditContext context)
    {
        var tasks = TaskOrder(probes, cases, context);
        var counts = new Dictionary<(string, string), int>();
        foreach (var c in cases) counts[(c.Expected, c.Got)] = counts.GetValueOrDefault((c.Expected, c.Got)) + 1;
        var rows = new List<string>(tasks);
        if (cases.Any(c => c.Expected == ProbeCase.Reject)) rows.Add(ProbeCase.Reject);
        var columns = new List<string>(tasks) { ConfusionTable.Rejected, ConfusionTable.Ambiguous };
        return new ConfusionTable(rows, columns, counts);
    }

    private static AuditCase[] Worst(AuditCase[] cases, Func<AuditCase, bool> filter, bool highestFirst, int count)
    {
        var selected = cases.Where(filter);
        var ordered = highestFirst ? selected.OrderByDescending(c => c.Score) : selected.OrderBy(c => c.Score);
        return ordered.ThenBy(c => c.Line).ThenBy(c => c.Utterance, StringComparer.Ordinal).Take(count).ToArray();
    }

    private static KindBreakdown[] ByKind(IReadOnlyList<ProbeCase> probes, AuditCase[] cases)
    {
        var order = new List<string?>();
        var groups = new Dictionary<string, (int In, int Out, int Correct)>(StringComparer.Ordinal);
        const string none = "\0none";
        for (int i = 0; i < cases.Length; i++)
        {
            var c = cases[i];
            string key = c.Kind ?? none;
            if (!groups.TryGetValue(key, out var g))
            {
                g = (0, 0, 0);
                if (c.Kind is not null) order.Add(c.Kind);
            }
            bool isIn = probes[i].IsInScope;
            bool ok = isIn ? c.Outcome == ResolutionOutcome.Accepted && c.Got == c.Expected : c.Outcome != ResolutionOutcome.Accepted;
            groups[key] = (g.In + (isIn ? 1 : 0), g.Out + (isIn ? 0 : 1), g.Correct + (ok ? 1 : 0));
        }
        if (groups.ContainsKey(none)) order.Add(null);
        return order.Select(kind =>
        {
            var g = groups[kind ?? none];
            return new KindBreakdown(kind, g.In, g.Out, new RateEstimate(g.Correct, g.In + g.Out));
        }).ToArray();
    }

    private static SweepPoint[] Sweep(IReadOnlyList<ProbeCase> probes, AuditCase[] cases, AuditContext context)
    {
        double accept = context.AcceptThreshold;
        var scored = cases.Where(c => c.Score != NoScore).Select(c => c.Score).ToList();
        double lo = Math.Min(accept, scored.Count > 0 ? scored.Min() : accept);
        double hi = Math.Max(accept, scored.Count > 0 ? scored.Max() : accept);
        var thresholds = new List<double>();
        int steps = context.SweepSteps;
        if (hi > lo)
            for (int i = 0; i < steps; i++) thresholds.Add(i == steps - 1 ? hi : Math.Round(lo + (hi - lo) * i / (steps - 1), 6));
        if (!thresholds.Any(t => Math.Abs(t - accept) <= 1e-12)) thresholds.Add(accept);
        thresholds = thresholds.Distinct().Order().ToList();

        int inScope = probes.Count(p => p.IsInScope), outOfScope = probes.Count - inScope;
        var points = new SweepPoint[thresholds.Count];
        for (int k = 0; k < thresholds.Count; k++)
        {
            double t = thresholds[k];
            int correct = 0, wrong = 0, falseAccepts = 0;
            foreach (var c in cases)
            {
                string? task = c.Outcome == ResolutionOutcome.Accepted ? c.Got
                    : c.Outcome == ResolutionOutcome.Rejected && c.Reason == RejectionReason.OutOfScope ? c.Nearest
                    : null;
                if (task is null || c.Score < t) continue;
                if (c.Expected == ProbeCase.Reject) falseAccepts++;
                else if (task == c.Expected) correct++;
                else wrong++;
            }
            points[k] = new SweepPoint(t, correct, wrong, falseAccepts, inScope, outOfScope);
        }
        return points;
    }
}
