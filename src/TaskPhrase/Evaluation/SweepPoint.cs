namespace TaskPhrase.Evaluation;

/// <summary>
/// Approximate results if the global accept threshold were <see cref="Threshold"/> (see
/// <see cref="AuditReport.ThresholdSweep"/> for the approximation). Immutable.
/// </summary>
/// <param name="Threshold">The accept threshold tried.</param>
/// <param name="Correct">In-scope probes that would be accepted as the expected task.</param>
/// <param name="WrongTask">In-scope probes that would be accepted as another task.</param>
/// <param name="FalseAccepts">Out-of-scope probes that would be accepted.</param>
/// <param name="InScope">In-scope probes (denominator of accuracy and wrong-task rate).</param>
/// <param name="OutOfScope">Out-of-scope probes (denominator of the false-accept rate).</param>
public sealed record SweepPoint(double Threshold, int Correct, int WrongTask, int FalseAccepts, int InScope, int OutOfScope)
{
    /// <summary>Correct / InScope; NaN without in-scope probes.</summary>
    public double InScopeAccuracy => InScope == 0 ? double.NaN : (double)Correct / InScope;

    /// <summary>WrongTask / InScope; NaN without in-scope probes.</summary>
    public double WrongTaskRate => InScope == 0 ? double.NaN : (double)WrongTask / InScope;

    /// <summary>FalseAccepts / OutOfScope; NaN without out-of-scope probes.</summary>
    public double FalseAcceptRate => OutOfScope == 0 ? double.NaN : (double)FalseAccepts / OutOfScope;
}
