using System.Text.Json;

namespace TaskPhrase.Tests;

/// <summary>
/// The CLINC150 "full" train and validation splits: Larson et al. (2019), "An Evaluation Dataset for Intent
/// Classification and Out-of-Scope Prediction", EMNLP-IJCNLP; CC BY 3.0. Loaded once per test run.
/// </summary>
public static class Clinc150
{
    private static readonly Lazy<Dictionary<string, (string Text, string Intent)[]>> Splits = new(Load);

    /// <summary>Rows of a split: <c>train</c>, <c>val</c>, <c>oos_train</c>, <c>oos_val</c>.</summary>
    public static IReadOnlyList<(string Text, string Intent)> Split(string name) => Splits.Value[name];

    private static Dictionary<string, (string, string)[]> Load()
    {
        using var doc = JsonDocument.Parse(File.ReadAllBytes(TestPaths.Clinc150));
        var result = new Dictionary<string, (string, string)[]>();
        foreach (var split in doc.RootElement.EnumerateObject())
            result[split.Name] = split.Value.EnumerateArray().Select(r => (r[0].GetString()!, r[1].GetString()!)).ToArray();
        return result;
    }
}
