using System.Globalization;
using System.Security.Cryptography;
using System.Text;

namespace TaskPhrase.Registry;

/// <summary>
/// The canonical form of a registry: compact JSON with a fixed key order, every optional value written out
/// (defaults explicitly, absent values as <c>null</c>, empty lists as <c>[]</c>), strings as stored (already
/// normalised by the loader), numbers in invariant round-trip format. Comments, key order within a mapping,
/// quoting style and indentation of the YAML do not change it; any change of content does.
/// <see cref="TaskRegistry.ContentHash"/> is the SHA-256 of its UTF-8 bytes.
/// </summary>
/// <remarks>
/// The JSON is written by hand (no serializer), so its bytes depend only on this code: only <c>"</c>,
/// <c>\</c> and control characters are escaped (as <c>\"</c>, <c>\\</c>, <c>\u00XX</c>), everything else is
/// written as UTF-8. Pure and thread-safe.
/// </remarks>
public static class RegistryCanonicalForm
{
    /// <summary>Name used as the source of diagnostics raised by <see cref="FromJson"/>.</summary>
    public const string SourceName = "canonical JSON";

    private static readonly RegistryLoadOptions FromJsonLimits = new()
    {
        MaxFileBytes = 256L * 1024 * 1024,
        MaxTasks = 100_000,
        MaxPhrases = 2_000_000,
        MaxNodes = 8_000_000,
    };

    /// <summary>The canonical JSON of <paramref name="registry"/> (one line, no trailing newline).</summary>
    /// <exception cref="ArgumentNullException"><paramref name="registry"/> is null.</exception>
    public static string ToJson(TaskRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(registry);
        return ToJson(registry.Tasks, registry.Defaults, registry.ModelId, registry.Settings);
    }

    /// <summary>SHA-256 (lower-case hex) of the UTF-8 bytes of <see cref="ToJson(TaskRegistry)"/>.</summary>
    /// <exception cref="ArgumentNullException"><paramref name="registry"/> is null.</exception>
    public static string ComputeHash(TaskRegistry registry) => HashOf(ToJson(registry));

    /// <summary>
    /// Rebuilds a registry from its canonical JSON, validating it with the same rules as the YAML loader.
    /// The result equals the registry the JSON was made from and has the same <see cref="TaskRegistry.ContentHash"/>.
    /// </summary>
    /// <param name="json">Canonical JSON as written by <see cref="ToJson(TaskRegistry)"/>.</param>
    /// <param name="sourcePath">Recorded as <see cref="TaskRegistry.SourcePath"/> of the result (e.g. the index file); optional.</param>
    /// <exception cref="ArgumentNullException"><paramref name="json"/> is null.</exception>
    /// <exception cref="RegistryException">The JSON is malformed or breaks a registry rule; the diagnostics say where.</exception>
    public static TaskRegistry FromJson(string json, string? sourcePath = null)
    {
        ArgumentNullException.ThrowIfNull(json);
        var bag = new DiagnosticBag(SourceName);
        byte[] utf8 = Encoding.UTF8.GetBytes(json);
        var registry = RegistryLoader.ParseJsonCore(utf8, bag, FromJsonLimits, sourcePath);
        return registry ?? throw new RegistryException(bag.ToList());
    }

    internal static string HashOf(string canonicalJson)
        => Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(canonicalJson)));

    internal static string ToJson(IReadOnlyList<TaskDefinition> tasks, RegistryDefaults defaults, string? modelId, RegistrySettings settings)
    {
        var sb = new StringBuilder(256 + tasks.Count * 256);
        sb.Append("{\"version\":1,\"model\":");
        AppendString(sb, modelId);
        sb.Append(",\"defaults\":{\"accept\":");
        AppendNumber(sb, defaults.Accept);
        sb.Append(",\"margin\":");
        AppendNumber(sb, defaults.Margin);
        sb.Append("},\"scoring\":");
        AppendScoring(sb, settings.Scoring, settings.ScoringParameters);
        sb.Append(",\"hazard_words\":");
        AppendList(sb, settings.HazardWords);
        sb.Append(",\"allow_words\":");
        AppendList(sb, settings.AllowWords);
        sb.Append(",\"tasks\":[");
        for (int i = 0; i < tasks.Count; i++)
        {
            var t = tasks[i];
            if (i > 0) sb.Append(',');
            sb.Append("{\"id\":");
            AppendString(sb, t.Id);
            sb.Append(",\"title\":");
            AppendString(sb, t.Title);
            sb.Append(",\"confirm\":").Append(t.Confirm ? "true" : "false");
            sb.Append(",\"accept\":");
            AppendNumber(sb, t.Accept);
            sb.Append(",\"margin\":");
            AppendNumber(sb, t.Margin);
            sb.Append(",\"controller\":{\"manifold\":");
            AppendString(sb, t.Controller.Manifold);
            sb.Append(",\"latent_dims\":").Append(t.Controller.LatentDims.ToString(CultureInfo.InvariantCulture));
            sb.Append(",\"decoder\":");
            AppendString(sb, t.Controller.Decoder);
            sb.Append("},\"phrases\":");
            AppendList(sb, t.Phrases);
            sb.Append(",\"must_reject\":");
            AppendList(sb, t.MustReject);
            sb.Append(",\"also_words\":");
            AppendList(sb, t.AlsoWords);
            sb.Append('}');
        }
        sb.Append("]}");
        return sb.ToString();
    }

    /// <summary>
    /// The plain name (so registries without parameters keep their hash), or <c>{"strategy":…,"shrinkage":…,"l2":…,"temperature":…,"probability_weight":…}</c>
    /// with only the set parameters.
    /// </summary>
    private static void AppendScoring(StringBuilder sb, string? name, ScoringParameters? parameters)
    {
        if (parameters is null || parameters.IsEmpty || name is null)
        {
            AppendString(sb, name);
            return;
        }
        sb.Append("{\"strategy\":");
        AppendString(sb, name);
        void Add(string key, double? value)
        {
            if (value is not double v) return;
            if (!double.IsFinite(v)) throw new ArgumentException($"A scoring parameter must be finite, but '{key}' is {v}.");
            sb.Append(",\"").Append(key).Append("\":").Append(v.ToString("R", CultureInfo.InvariantCulture));
        }
        Add("shrinkage", parameters.Shrinkage);
        Add("l2", parameters.L2);
        Add("temperature", parameters.Temperature);
        Add("probability_weight", parameters.ProbabilityWeight);
        Add("k", parameters.K);
        Add("centroid_weight", parameters.CentroidWeight);
        sb.Append('}');
    }

    private static void AppendNumber(StringBuilder sb, float? value)
    {
        if (value is not float f)
        {
            sb.Append("null");
            return;
        }
        if (!float.IsFinite(f)) throw new ArgumentException($"A registry threshold must be finite, but one is {f}.");
        if (f == 0) f = 0; // one spelling for -0 and 0
        sb.Append(f.ToString("R", CultureInfo.InvariantCulture));
    }

    private static void AppendList(StringBuilder sb, IReadOnlyList<string> items)
    {
        sb.Append('[');
        for (int i = 0; i < items.Count; i++)
        {
            if (i > 0) sb.Append(',');
            AppendString(sb, items[i]);
        }
        sb.Append(']');
    }

    private static void AppendString(StringBuilder sb, string? value)
    {
        if (value is null)
        {
            sb.Append("null");
            return;
        }
        sb.Append('"');
        for (int i = 0; i < value.Length; i++)
        {
            char c = value[i];
            if (c == '"') sb.Append("\\\"");
            else if (c == '\\') sb.Append("\\\\");
            else if (c < 0x20 || c == 0x7F || (char.IsSurrogate(c) && !IsPairAt(value, i)))
                sb.Append("\\u").Append(((int)c).ToString("x4", CultureInfo.InvariantCulture));
            else if (char.IsHighSurrogate(c))
            {
                sb.Append(c).Append(value[i + 1]);
                i++;
            }
            else sb.Append(c);
        }
        sb.Append('"');
    }

    private static bool IsPairAt(string s, int i)
        => char.IsHighSurrogate(s[i]) && i + 1 < s.Length && char.IsLowSurrogate(s[i + 1]);
}
