namespace TaskPhrase.Evaluation;

/// <summary>
/// One point of a ROC curve: the false- and true-positive rates of the rule "accept when score ≥ <see cref="Threshold"/>".
/// </summary>
/// <param name="Fpr">False-positive rate: negatives with score ≥ threshold / negatives.</param>
/// <param name="Tpr">True-positive rate: positives with score ≥ threshold / positives.</param>
/// <param name="Threshold">The threshold; <see cref="double.PositiveInfinity"/> for the first point (nothing accepted).</param>
public readonly record struct RocPoint(double Fpr, double Tpr, double Threshold);
