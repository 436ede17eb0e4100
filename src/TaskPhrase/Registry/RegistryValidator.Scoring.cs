namespace TaskPhrase.Registry;

internal sealed partial class RegistryValidator
{
    /// <summary>Keys of the mapping form of <c>scoring</c>.</summary>
    internal static readonly string[] ScoringKeys = ["strategy", "shrinkage", "l2", "temperature", "probability_weight", "k", "centroid_weight"];

    /// <summary>
    /// <c>scoring: NAME</c>, or <c>scoring: {strategy: NAME, shrinkage: λ, l2: λ, temperature: T}</c> with the parameters
    /// the strategy has (shrinkage: whitened and head; l2 and temperature: head).
    /// </summary>
    private (string? Name, ScoringParameters? Parameters) ReadScoring(RegistryMapping map)
    {
        string hint = "name a strategy: " + string.Join(", ", ScoringNames);
        if (!map.TryGet("scoring", out _, out var value) || value is RegistryScalar { IsNull: true }) return (null, null);
        if (value is not RegistryMapping scoring)
        {
            string? name = ReadOptionalText(map, "scoring", "the registry", hint + ", or give a mapping with 'strategy' and its parameters", normalize: false);
            return (CheckScoringName(name, value), null);
        }
        CheckKeys(scoring, ScoringKeys, "'scoring'");
        if (!scoring.TryGet("strategy", out _, out var strategyNode) || strategyNode is RegistryScalar { IsNull: true })
        {
            _bag.Error(RegistryDiagnosticCodes.UnknownScoring, scoring.Position, $"'scoring' has no 'strategy'; {hint}.");
            return (null, null);
        }
        string? strategy = CheckScoringName(ReadOptionalText(scoring, "strategy", "'scoring'", hint, normalize: false), strategyNode);
        double? shrinkage = ReadScoringNumber(scoring, "shrinkage", strategy, ["whitened", "head"], 0, 1, lowOpen: false,
            "the share of the scaled identity mixed into the covariance, from 0 to 1; omit it for the Ledoit–Wolf estimate");
        double? l2 = ReadScoringNumber(scoring, "l2", strategy, ["head"], 0, 1000, lowOpen: true, "the head's L2 penalty, above 0 and at most 1000 (0.001 to 0.1 is usual)");
        double? temperature = ReadScoringNumber(scoring, "temperature", strategy, ["head"], 0.01, 100, lowOpen: false, "the head's softmax temperature, from 0.01 to 100 (1 to 4 is usual)");
        double? weight = ReadScoringNumber(scoring, "probability_weight", strategy, ["head"], 0, 1, lowOpen: false,
            "the weight of the head's probability against the centroid cosine in the task score, from 0 to 1 (0.5: their geometric mean)");
        double? k = ReadScoringNumber(scoring, "k", strategy, ["top-k"], 1, ScoringParameters.MaxK, lowOpen: false,
            $"how many of a task's best phrase similarities are averaged, a whole number from 1 to {ScoringParameters.MaxK}");
        if (k is { } kv && kv != Math.Floor(kv) && scoring.TryGet("k", out _, out var kNode))
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, kNode.Position, $"'k' of 'scoring' must be a whole number (how many best phrases are averaged), but is {kv.ToString(System.Globalization.CultureInfo.InvariantCulture)}.");
            k = null;
        }
        double? centroidWeight = ReadScoringNumber(scoring, "centroid_weight", strategy, ["blend"], 0, 1, lowOpen: false,
            "the weight of the centroid cosine against the best phrase's, from 0 to 1 (0.5: their mean)");
        var parameters = new ScoringParameters
        {
            Shrinkage = shrinkage, L2 = l2, Temperature = temperature, ProbabilityWeight = weight, K = k is { } kk ? (int)kk : null, CentroidWeight = centroidWeight,
        };
        return (strategy, parameters.IsEmpty ? null : parameters);
    }

    private string? CheckScoringName(string? scoring, RegistryNode at)
    {
        if (scoring is null || ScoringNames.Contains(scoring, StringComparer.Ordinal)) return scoring;
        string? suggestion = EditDistance.Suggest(scoring, ScoringNames);
        _bag.Error(RegistryDiagnosticCodes.UnknownScoring, at.Position,
            $"'{scoring}' is not a scoring strategy{(suggestion is null ? "" : $"; did you mean '{suggestion}'?")}. Use one of: {string.Join(", ", ScoringNames)}.");
        return null;
    }

    private double? ReadScoringNumber(RegistryMapping scoring, string key, string? strategy, string[] strategies, double low, double high, bool lowOpen, string meaning)
    {
        if (!scoring.TryGet(key, out var keyNode, out var value) || value is RegistryScalar { IsNull: true }) return null;
        if (strategy is not null && !strategies.Contains(strategy, StringComparer.Ordinal))
        {
            _bag.Error(RegistryDiagnosticCodes.UnknownKey, keyNode.Position,
                $"'{key}' of 'scoring' applies to the strategy {string.Join(" and ", strategies)} only, not to '{strategy}'; remove it or change the strategy.");
            return null;
        }
        if (value is not RegistryScalar { IsPlain: true } s || !TryParseFloat(s.Value, out double number, out _))
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position, $"'{key}' of 'scoring' must be a number ({meaning}), but is {value.Describe()}.");
            return null;
        }
        if (!double.IsFinite(number) || (lowOpen ? number <= low : number < low) || number > high)
        {
            _bag.Error(RegistryDiagnosticCodes.OutOfRange, s.Position, $"'{key}' of 'scoring' is {s.Value}, out of range: {meaning}.");
            return null;
        }
        return number == 0 ? 0 : number;
    }
}
