namespace TaskPhrase.Evaluation;

/// <summary>
/// One point of the accuracy / wrong-task trade-off curve: the best in-scope accuracy reachable on the
/// tuning suite with a wrong-task rate of at most <see cref="MaxWrongTask"/> (and the false-accept budget met),
/// using a single accept threshold and margin. Immutable.
/// </summary>
/// <param name="MaxWrongTask">The wrong-task cap of this point.</param>
/// <param name="Feasible">False when no setting met both the cap and the false-accept budget.</param>
/// <param name="InScopeAccuracy">Best in-scope accuracy under the cap (0 when infeasible).</param>
/// <param name="WrongTaskRate">Wrong-task rate of that setting.</param>
/// <param name="FalseAcceptRate">False-accept rate of that setting.</param>
/// <param name="Accept">Accept threshold of that setting; null when infeasible.</param>
/// <param name="Margin">Margin of that setting; null when infeasible.</param>
public sealed record TradeOffPoint(double MaxWrongTask, bool Feasible, double InScopeAccuracy, double WrongTaskRate,
    double FalseAcceptRate, float? Accept, float? Margin);
