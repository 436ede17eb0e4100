using System.Diagnostics;
using System.Globalization;

namespace TaskPhrase.Benchmarks;

/// <summary>Timings of one operation in microseconds, with order statistics (nearest-rank percentiles).</summary>
internal sealed class Samples(string name, int capacity)
{
    private readonly List<double> _values = new(capacity);
    private double[]? _sorted;

    public string Name { get; } = name;

    public int Count => _values.Count;

    public IReadOnlyList<double> Values => _values;

    public void Add(double microseconds)
    {
        _values.Add(microseconds);
        _sorted = null;
    }

    /// <summary>Runs <paramref name="action"/> once and records its wall time.</summary>
    public void Time(Action action)
    {
        long start = Stopwatch.GetTimestamp();
        action();
        Add(Stopwatch.GetElapsedTime(start).TotalMicroseconds);
    }

    /// <summary>The nearest-rank percentile (p in 0..100).</summary>
    public double Percentile(double p)
    {
        _sorted ??= _values.Order().ToArray();
        if (_sorted.Length == 0) return double.NaN;
        int rank = (int)Math.Ceiling(p / 100.0 * _sorted.Length);
        return _sorted[Math.Clamp(rank - 1, 0, _sorted.Length - 1)];
    }

    public double Median => Percentile(50);

    public static string Us(double microseconds) => microseconds >= 1000
        ? (microseconds / 1000).ToString("0.00", CultureInfo.InvariantCulture) + " ms"
        : microseconds.ToString("0.0", CultureInfo.InvariantCulture) + " µs";

    public string Row() => $"| {Name} | {Count} | {Us(Median)} | {Us(Percentile(90))} | {Us(Percentile(99))} | {Us(Percentile(100))} | {(Percentile(99) / Median).ToString("0.00", CultureInfo.InvariantCulture)} |";

    public const string Header = "| operation | runs | median | p90 | p99 | max | p99 / median |\n| --- | ---: | ---: | ---: | ---: | ---: | ---: |";
}
