using System.Globalization;

namespace TaskPhrase.Benchmarks;

/// <summary>The <c>--name value</c> and <c>--flag</c> arguments of the harness subcommands.</summary>
internal sealed class HarnessArguments
{
    private readonly Dictionary<string, string?> _values = new(StringComparer.Ordinal);

    public HarnessArguments(IEnumerable<string> args, params string[] known)
    {
        var list = args.ToList();
        for (int i = 0; i < list.Count; i++)
        {
            string a = list[i];
            if (!a.StartsWith("--", StringComparison.Ordinal) || !known.Contains(a[2..]))
                throw new ArgumentException($"Unknown argument '{a}'; known: {string.Join(", ", known.Select(k => "--" + k))}.");
            bool hasValue = i + 1 < list.Count && !list[i + 1].StartsWith("--", StringComparison.Ordinal);
            _values[a[2..]] = hasValue ? list[++i] : null;
        }
    }

    public bool Flag(string name) => _values.ContainsKey(name);

    public string Text(string name, string fallback)
        => _values.TryGetValue(name, out var v) ? v ?? throw new ArgumentException($"--{name} needs a value.") : fallback;

    public int Int(string name, int fallback)
    {
        if (!_values.TryGetValue(name, out var v)) return fallback;
        return int.TryParse(v, NumberStyles.Integer, CultureInfo.InvariantCulture, out int n) && n >= 0
            ? n
            : throw new ArgumentException($"--{name} needs a non-negative whole number, got '{v}'.");
    }

    public IReadOnlyList<int> Ints(string name, params int[] fallback)
    {
        if (!_values.TryGetValue(name, out var v)) return fallback;
        return (v ?? "").Split(',').Select(s => int.TryParse(s, NumberStyles.Integer, CultureInfo.InvariantCulture, out int n) && n >= 0
            ? n
            : throw new ArgumentException($"--{name} needs comma-separated whole numbers, got '{v}'.")).ToArray();
    }
}
