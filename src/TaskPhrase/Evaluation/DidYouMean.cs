namespace TaskPhrase.Evaluation;

/// <summary>Suggests the closest known name for a misspelt one (optimal string alignment distance).</summary>
internal static class DidYouMean
{
    /// <summary>The candidate closest to <paramref name="name"/> within a distance of max(2, length/3), or null. Ties go to the ordinal-first candidate.</summary>
    public static string? Closest(string name, IEnumerable<string> candidates)
    {
        string? best = null;
        int bestDistance = int.MaxValue;
        int limit = Math.Max(2, name.Length / 3);
        foreach (var candidate in candidates.Order(StringComparer.Ordinal))
        {
            int d = Distance(name.ToLowerInvariant(), candidate.ToLowerInvariant());
            if (d < bestDistance) { best = candidate; bestDistance = d; }
        }
        return bestDistance <= limit ? best : null;
    }

    /// <summary>Optimal string alignment distance (Levenshtein plus adjacent transpositions).</summary>
    internal static int Distance(string a, string b)
    {
        var d = new int[a.Length + 1, b.Length + 1];
        for (int i = 0; i <= a.Length; i++) d[i, 0] = i;
        for (int j = 0; j <= b.Length; j++) d[0, j] = j;
        for (int i = 1; i <= a.Length; i++)
        {
            for (int j = 1; j <= b.Length; j++)
            {
                int cost = a[i - 1] == b[j - 1] ? 0 : 1;
                d[i, j] = Math.Min(Math.Min(d[i - 1, j] + 1, d[i, j - 1] + 1), d[i - 1, j - 1] + cost);
                if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
                    d[i, j] = Math.Min(d[i, j], d[i - 2, j - 2] + 1);
            }
        }
        return d[a.Length, b.Length];
    }
}
