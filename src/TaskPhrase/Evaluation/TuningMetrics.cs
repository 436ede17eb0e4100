namespace TaskPhrase.Evaluation;

/// <summary>
/// The audit rates of one decision rule on a set of scored probes, with the definitions of the design's
/// "Audit metrics": in-scope accuracy, wrong-task rate and false-reject rate over in-scope probes,
/// false-accept rate over out-of-scope probes. Immutable.
/// </summary>
public sealed record TuningMetrics
{
    private TuningMetrics(int inScope, int outOfScope, int correct, int wrong, int falseReject, int falseAccept)
    {
        InScope = inScope;
        OutOfScope = outOfScope;
        InScopeAccuracy = new RateEstimate(correct, inScope);
        WrongTaskRate = new RateEstimate(wrong, inScope);
        FalseRejectRate = new RateEstimate(falseReject, inScope);
        FalseAcceptRate = new RateEstimate(falseAccept, outOfScope);
    }

    /// <summary>Number of in-scope probes (expecting a task).</summary>
    public int InScope { get; }

    /// <summary>Number of out-of-scope probes (expecting <c>reject</c>).</summary>
    public int OutOfScope { get; }

    /// <summary>In-scope probes accepted as the expected task / in-scope probes.</summary>
    public RateEstimate InScopeAccuracy { get; }

    /// <summary>In-scope probes accepted as another task / in-scope probes (the dangerous error).</summary>
    public RateEstimate WrongTaskRate { get; }

    /// <summary>In-scope probes rejected or ambiguous / in-scope probes.</summary>
    public RateEstimate FalseRejectRate { get; }

    /// <summary>Out-of-scope probes accepted as any task / out-of-scope probes.</summary>
    public RateEstimate FalseAcceptRate { get; }

    /// <summary>Applies <paramref name="rule"/> to every probe and counts the outcomes.</summary>
    /// <exception cref="ArgumentNullException">An argument is null.</exception>
    public static TuningMetrics Evaluate(IEnumerable<ScoredProbe> probes, DecisionRule rule)
    {
        ArgumentNullException.ThrowIfNull(probes);
        ArgumentNullException.ThrowIfNull(rule);
        int inScope = 0, outOfScope = 0, correct = 0, wrong = 0, falseReject = 0, falseAccept = 0;
        foreach (var probe in probes)
        {
            ArgumentNullException.ThrowIfNull(probe, nameof(probes));
            var decision = rule.Apply(probe);
            if (probe.Probe.IsInScope)
            {
                inScope++;
                if (!decision.IsAccepted) falseReject++;
                else if (decision.Task == probe.Probe.Expect) correct++;
                else wrong++;
            }
            else
            {
                outOfScope++;
                if (decision.IsAccepted) falseAccept++;
            }
        }
        return new TuningMetrics(inScope, outOfScope, correct, wrong, falseReject, falseAccept);
    }
}
