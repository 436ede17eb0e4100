using System.Collections.ObjectModel;

namespace TaskPhrase.Evaluation;

/// <summary>
/// Search settings of <see cref="ThresholdTuner"/>. Values are checked when set; an instance is
/// immutable once built (<c>init</c> only) and safe to share.
/// </summary>
public sealed class TuningOptions
{
    /// <summary>The default settings.</summary>
    public static TuningOptions Default { get; } = new();

    /// <summary>The documented minimum of in-scope probes a task needs before a per-task accept override is considered.</summary>
    public const int DefaultMinProbesForOverride = 10;

    private readonly IReadOnlyList<float> _marginGrid = DefaultMarginGrid();
    private readonly int _maxGapMargins = 200;
    private readonly int _minProbesForOverride = DefaultMinProbesForOverride;
    private readonly float _maxOverrideShift = 0.10f;
    private readonly IReadOnlyList<double> _tradeOffCaps =
        Array.AsReadOnly(new[] { 0.0, 0.0025, 0.005, 0.01, 0.02, 0.03, 0.05, 0.075, 0.10, 0.15, 0.20, 1.0 });

    /// <summary>
    /// Margins always tried: by default 0, 0.005, …, 0.10. Each must be finite and ≥ 0; the largest is also
    /// the largest margin the search will choose. Must not be empty.
    /// </summary>
    public IReadOnlyList<float> MarginGrid
    {
        get => _marginGrid;
        init
        {
            ArgumentNullException.ThrowIfNull(value);
            if (value.Count == 0) throw new ArgumentException("The margin grid needs at least one margin (e.g. 0).", nameof(MarginGrid));
            foreach (float m in value)
            {
                if (!float.IsFinite(m) || m < 0)
                {
                    throw new ArgumentOutOfRangeException(nameof(MarginGrid), m, $"Every margin in the grid must be a finite number of at least 0; got {m}.");
                }
            }
            _marginGrid = Array.AsReadOnly(value.Distinct().Order().ToArray());
        }
    }

    /// <summary>
    /// Also try margins between the observed best-minus-runner-up gaps (up to the largest grid margin), so
    /// that every distinct split of the suite by margin is reachable. Default true.
    /// </summary>
    public bool IncludeGapMargins { get; init; } = true;

    /// <summary>
    /// At most this many gap margins are added (evenly spaced over the sorted gaps when there are more);
    /// bounds the search at O(n log n + (grid + this) · n). Default 200; at least 1.
    /// </summary>
    public int MaxGapMargins
    {
        get => _maxGapMargins;
        init => _maxGapMargins = value >= 1 ? value
            : throw new ArgumentOutOfRangeException(nameof(MaxGapMargins), value, $"MaxGapMargins must be at least 1; got {value}.");
    }

    /// <summary>Consider per-task accept overrides at all. Default true.</summary>
    public bool AllowOverrides { get; init; } = true;

    /// <summary>
    /// A task needs at least this many in-scope probes expecting it before an override is considered
    /// (default <see cref="DefaultMinProbesForOverride"/>, at least 1).
    /// </summary>
    public int MinProbesForOverride
    {
        get => _minProbesForOverride;
        init => _minProbesForOverride = value >= 1 ? value
            : throw new ArgumentOutOfRangeException(nameof(MinProbesForOverride), value, $"MinProbesForOverride must be at least 1; got {value}.");
    }

    /// <summary>An override may differ from the tuned global accept threshold by at most this much (default 0.10, finite, &gt; 0).</summary>
    public float MaxOverrideShift
    {
        get => _maxOverrideShift;
        init => _maxOverrideShift = float.IsFinite(value) && value > 0 ? value
            : throw new ArgumentOutOfRangeException(nameof(MaxOverrideShift), value, $"MaxOverrideShift must be a finite number above 0; got {value}.");
    }

    /// <summary>Wrong-task caps of the trade-off curve (each in [0, 1]); default 0 to 0.20 and 1.</summary>
    public IReadOnlyList<double> TradeOffWrongTaskCaps
    {
        get => _tradeOffCaps;
        init
        {
            ArgumentNullException.ThrowIfNull(value);
            foreach (double c in value)
            {
                if (!(c >= 0 && c <= 1))
                {
                    throw new ArgumentOutOfRangeException(nameof(TradeOffWrongTaskCaps), c, $"Every trade-off cap must be a rate between 0 and 1; got {c}.");
                }
            }
            _tradeOffCaps = Array.AsReadOnly(value.Distinct().Order().ToArray());
        }
    }

    private static ReadOnlyCollection<float> DefaultMarginGrid()
    {
        var grid = new float[21];
        for (int i = 0; i < grid.Length; i++) grid[i] = (float)Math.Round(i * 0.005, 3);
        return Array.AsReadOnly(grid);
    }
}
