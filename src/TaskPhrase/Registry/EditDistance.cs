namespace TaskPhrase.Registry;

/// <summary>Edit distance for did-you-mean suggestions.</summary>
internal static class EditDistance
{
    /// <summary>
    /// Optimal-string-alignment distance (Levenshtein plus adjacent transpositions), case-insensitive.
    /// </summary>
    public static int Between(string a, string b)
    {
        a = a.ToLowerInvariant();
        b = b.ToLowerInvariant();
        var d = new int[a.Length + 1, b.Length + 1];
        for (int i = 0; i <= a.Length; i++) d[i, 0] = i;
        for (int j = 0; j <= b.Length; j++) d[0, j] = j;
        for (int i = 1; i <= a.Length; i++)
        {
            for (int j = 1; j <= b.Length; j++)
            {
                int cost = a[i - 1] == b[j - 1] ? 0 : 1;
                int best = Math.Min(Math.Min(d[i - 1, j] + 1, d[i, j - 1] + 1), d[i - 1, j - 1] + cost);
                if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
                    best = Math.Min(best, d[i - 2, j - 2] + 1);
                d[i, j] = best;
            }
        }
        return d[a.Length, b.Length];
    }

    /// <summary>
    /// <see cref="Between(string, string)"/> for words without surrogate pairs (as <see cref="Text.WordStemmer.Words"/>
    /// gives them), on three rolling rows of the table kept on the stack: the same distance, without allocating.
    /// </summary>
    public static int BetweenWords(ReadOnlySpan<char> a, ReadOnlySpan<char> b)
    {
        int width = b.Length + 1;
        Span<int> table = 3 * width <= 768 ? stackalloc int[3 * width] : new int[3 * width];
        // Row i of the full table lives at (i % 3) · width; rows i - 1 and i - 2 are the other two.
        for (int j = 0; j <= b.Length; j++) table[j] = j;
        for (int i = 1; i <= a.Length; i++)
        {
            var row = table.Slice(i % 3 * width, width);
            var up = table.Slice((i - 1) % 3 * width, width);
            var upUp = table.Slice((i + 1) % 3 * width, width);
            row[0] = i;
            char ai = char.ToLowerInvariant(a[i - 1]);
            for (int j = 1; j <= b.Length; j++)
            {
                char bj = char.ToLowerInvariant(b[j - 1]);
                int cost = ai == bj ? 0 : 1;
                int best = Math.Min(Math.Min(up[j] + 1, row[j - 1] + 1), up[j - 1] + cost);
                if (i > 1 && j > 1 && ai == char.ToLowerInvariant(b[j - 2]) && char.ToLowerInvariant(a[i - 2]) == bj)
                    best = Math.Min(best, upUp[j - 2] + 1);
                row[j] = best;
            }
        }
        return table[a.Length % 3 * width + b.Length];
    }

    /// <summary>
    /// The candidate closest to <paramref name="word"/>, or null when none is close enough to be a likely typo
    /// (distance at most max(2, a third of the word's length)). Ties go to the earlier candidate.
    /// </summary>
    public static string? Suggest(string word, IEnumerable<string> candidates)
    {
        if (word.Length > 64) return null;
        int limit = Math.Max(2, word.Length / 3);
        string? best = null;
        int bestDistance = int.MaxValue;
        foreach (var candidate in candidates)
        {
            int distance = Between(word, candidate);
            if (distance < bestDistance)
            {
                best = candidate;
                bestDistance = distance;
            }
        }
        return bestDistance <= limit ? best : null;
    }
}
