using System.Globalization;

namespace TaskPhrase.Evaluation;

/// <summary>Settings of <see cref="ProbeGenerator.Generate"/>. Checked when set; immutable once built.</summary>
public sealed class ProbeGeneratorOptions
{
    private readonly int _count = 200;
    private readonly IReadOnlyList<string> _kinds = ProbeKinds.All;

    /// <summary>Seed of the generator; the same seed, registry and settings give the same rows. Default 1.</summary>
    public ulong Seed { get; init; } = 1;

    /// <summary>Total number of rows, split evenly over <see cref="Kinds"/> (at least 1; default 200).</summary>
    public int Count
    {
        get => _count;
        init => _count = value >= 1 ? value
            : throw new ArgumentOutOfRangeException(nameof(Count), value, $"The number of probes must be at least 1; got {value}.");
    }

    /// <summary>The kinds to generate (see <see cref="ProbeKinds"/>); default all. Duplicates are ignored; unknown kinds are refused.</summary>
    public IReadOnlyList<string> Kinds
    {
        get => _kinds;
        init
        {
            ArgumentNullException.ThrowIfNull(value);
            if (value.Count == 0) throw new ArgumentException($"Give at least one probe kind: {string.Join(", ", ProbeKinds.All)}.", nameof(Kinds));
            foreach (string kind in value)
            {
                if (!ProbeKinds.All.Contains(kind, StringComparer.Ordinal))
                {
                    string? near = ProbeKinds.All.MinBy(k => Distance(k, kind ?? ""));
                    string hint = near is not null && Distance(near, kind ?? "") <= 3 ? $" Did you mean '{near}'?" : "";
                    throw new ArgumentException(
                        string.Create(CultureInfo.InvariantCulture, $"Unknown probe kind '{kind}'.{hint} Known kinds: {string.Join(", ", ProbeKinds.All)}."),
                        nameof(Kinds));
                }
            }
            _kinds = Array.AsReadOnly(value.Distinct(StringComparer.Ordinal).ToArray());
        }
    }

    /// <summary>Levenshtein distance, for the did-you-mean hint.</summary>
    private static int Distance(string a, string b)
    {
        var row = Enumerable.Range(0, b.Length + 1).ToArray();
        for (int i = 1; i <= a.Length; i++)
        {
            int diagonal = row[0];
            row[0] = i;
            for (int j = 1; j <= b.Length; j++)
            {
                int above = row[j];
                row[j] = Math.Min(Math.Min(row[j] + 1, row[j - 1] + 1), diagonal + (a[i - 1] == b[j - 1] ? 0 : 1));
                diagonal = above;
            }
        }
        return row[b.Length];
    }
}
