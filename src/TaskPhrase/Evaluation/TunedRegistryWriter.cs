using System.Globalization;
using System.Text;

namespace TaskPhrase.Evaluation;

/// <summary>
/// Writes a copy of a registry file with tuned thresholds (<c>tune --output</c>): <c>defaults.accept</c> and
/// <c>defaults.margin</c> set (the <c>defaults</c> block added when missing), the <c>scoring</c> key set when the
/// tuning chose a scoring setting (<see cref="TuningResult.Scoring"/>), per-task <c>accept</c> overrides set,
/// and a comment block at the top recording how the values were obtained. Everything else (comments, key order,
/// quoting, blank lines) is kept: the file is edited line by line at the positions YamlDotNet's parser reports.
/// </summary>
/// <remarks>
/// <para>The tuned figures assume that every task without an override uses the registry-wide accept threshold and
/// margin. So a per-task <c>accept</c> of a task without a tuned override, and every per-task <c>margin</c>, is
/// commented out (kept visible, marked as removed by tune) rather than silently left in force.</para>
/// <para>Block-style mappings are edited in place. A task written in flow style (<c>- { id: …, accept: … }</c>)
/// that needs an edit is refused with its location. A previous tune comment block at the top is replaced.
/// The output is parsed again before it is written, as a check. Stateless and thread-safe.</para>
/// </remarks>
public static partial class TunedRegistryWriter
{
    /// <summary>First line of the comment block this writer puts at the top of the file.</summary>
    public const string HeaderStart = "# --- taskphrase tune ---";

    /// <summary>Last line of the comment block this writer puts at the top of the file.</summary>
    public const string HeaderEnd = "# --- end taskphrase tune ---";

    /// <summary>The warning every tuned file carries.</summary>
    public const string Warning =
        "WARNING: these thresholds were fitted to the suite named above and look better there than they will elsewhere; " +
        "confirm them with 'taskphrase audit' on a separate probe suite before use.";

    /// <summary>Reads <paramref name="sourceYamlPath"/> (UTF-8) and writes the tuned copy to <paramref name="output"/>.</summary>
    /// <param name="sourceYamlPath">The registry file.</param>
    /// <param name="result">The tuning result whose thresholds to write.</param>
    /// <param name="provenanceComment">How the values were obtained (see <see cref="BuildProvenanceComment"/>); one or more lines, written as comments.</param>
    /// <param name="output">Where to write; not closed.</param>
    /// <exception cref="ArgumentNullException">An argument is null.</exception>
    /// <exception cref="IOException">The file cannot be read.</exception>
    /// <exception cref="FormatException">The file is not YAML of the registry's shape, or needs an edit in a flow-style mapping; the message has file, line and column.</exception>
    /// <exception cref="ArgumentException">The result overrides a task the file does not define.</exception>
    public static void WriteFromFile(string sourceYamlPath, TuningResult result, string provenanceComment, TextWriter output)
    {
        ArgumentNullException.ThrowIfNull(sourceYamlPath);
        string text = File.ReadAllText(sourceYamlPath, Encoding.UTF8);
        Write(text, result, provenanceComment, output, sourceYamlPath);
    }

    /// <summary>Writes the tuned copy of the registry text <paramref name="yamlText"/> to <paramref name="output"/>.</summary>
    /// <param name="yamlText">The registry YAML.</param>
    /// <param name="result">The tuning result whose thresholds to write.</param>
    /// <param name="provenanceComment">How the values were obtained; one or more lines, written as comments.</param>
    /// <param name="output">Where to write; not closed.</param>
    /// <param name="sourceName">File name used in error messages; null for <c>registry</c>.</param>
    /// <exception cref="ArgumentNullException">An argument is null.</exception>
    /// <exception cref="FormatException">The text is not YAML of the registry's shape, or needs an edit in a flow-style mapping; the message has line and column.</exception>
    /// <exception cref="ArgumentException">The result overrides a task the text does not define.</exception>
    public static void Write(string yamlText, TuningResult result, string provenanceComment, TextWriter output, string? sourceName = null)
    {
        ArgumentNullException.ThrowIfNull(yamlText);
        ArgumentNullException.ThrowIfNull(result);
        ArgumentNullException.ThrowIfNull(provenanceComment);
        ArgumentNullException.ThrowIfNull(output);
        string edited = Rewrite(yamlText, result, provenanceComment, sourceName ?? "registry");
        output.Write(edited);
    }

    /// <summary>
    /// The standard provenance text: date, suite name and SHA-256, probe counts, mode with budgets or coverage
    /// target, the chosen values and the achieved figures with their 95 % Wilson intervals. One line per fact.
    /// </summary>
    /// <param name="result">The tuning result.</param>
    /// <param name="suiteName">Name (or path) of the tuning probe suite.</param>
    /// <param name="suiteSha256">SHA-256 of the suite file, lower-case hex.</param>
    /// <param name="when">When the tuning ran; written as a UTC date and time.</param>
    /// <param name="searched">The settings a <see cref="ScoringSearch"/> tried, or null when the scoring was not searched.</param>
    /// <exception cref="ArgumentNullException">An argument is null.</exception>
    public static string BuildProvenanceComment(TuningResult result, string suiteName, string suiteSha256, DateTimeOffset when,
        IReadOnlyList<ScoringSearchOutcome>? searched = null)
    {
        ArgumentNullException.ThrowIfNull(result);
        ArgumentNullException.ThrowIfNull(suiteName);
        ArgumentNullException.ThrowIfNull(suiteSha256);
        var inv = CultureInfo.InvariantCulture;
        var m = result.Metrics;
        var sb = new StringBuilder();
        sb.AppendLine(string.Create(inv, $"Thresholds chosen by 'taskphrase tune' on {when.UtcDateTime:yyyy-MM-dd HH:mm} UTC."));
        sb.AppendLine(string.Create(inv, $"Tuning suite: {suiteName} (SHA-256 {suiteSha256}), {result.ProbeCount} probes: {m.InScope} in-scope, {m.OutOfScope} out-of-scope."));
        if (result.Mode == TuningMode.Budget && result.Budgets is { } b)
        {
            string wrong = b.MaxWrongTask is { } w ? w.ToString(inv) : "not capped";
            string judged = b.UseConfidenceBound ? " (each rate judged by the upper end of its 95 % Wilson interval)" : "";
            sb.AppendLine(string.Create(inv, $"Mode: budgets, false-accept rate <= {b.MaxFalseAccept}, wrong-task rate <= {wrong}{judged}; best in-scope accuracy within them."));
        }
        else
        {
            string q = result.ConformalQuantile is { } qh ? qh.ToString("0.######", inv) : "none (too few in-scope probes)";
            sb.AppendLine(string.Create(inv, $"Mode: coverage {result.CoverageTarget} (split conformal, Angelopoulos & Bates 2021), q-hat = {q}."));
        }
        string overrides = result.AcceptOverrides.Count == 0 ? "none"
            : string.Join(", ", result.AcceptOverrides.OrderBy(o => o.Key, StringComparer.Ordinal).Select(o => $"{o.Key} {FormatNumber(o.Value)}"));
        if (result.Scoring is { } scoring)
        {
            sb.AppendLine(searched is { Count: > 0 }
                ? $"Scoring: {scoring.Label}, the best of {searched.Count} settings searched jointly with the thresholds ({string.Join(", ", searched.Select(o => o.Candidate.Strategy).Distinct(StringComparer.Ordinal))})."
                : $"Scoring: {scoring.Label}.");
        }
        sb.AppendLine($"Chosen: accept {FormatNumber(result.Accept)}, margin {FormatNumber(result.Margin)}; per-task accept: {overrides}.");
        sb.AppendLine($"Achieved on the tuning suite: in-scope accuracy {m.InScopeAccuracy}, wrong-task rate {m.WrongTaskRate},");
        sb.AppendLine($"  false-reject rate {m.FalseRejectRate}, false-accept rate {m.FalseAcceptRate}.");
        sb.Append(result.Feasible ? "Budgets met on the tuning suite." : "NOT FEASIBLE: the values above are the closest the search came; they do not meet the target.");
        return sb.ToString();
    }

    /// <summary>Formats a threshold for YAML: the shortest round-trip decimal, never in exponent notation.</summary>
    internal static string FormatNumber(float value)
    {
        string s = value.ToString(CultureInfo.InvariantCulture);
        int e = s.IndexOf('E', StringComparison.Ordinal);
        if (e < 0) return s;
        // Move the decimal point of the shortest round-trip mantissa instead of printing an exponent.
        bool negative = s[0] == '-';
        string mantissa = s[(negative ? 1 : 0)..e];
        int exponent = int.Parse(s[(e + 1)..], NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture);
        int dot = mantissa.IndexOf('.', StringComparison.Ordinal);
        string digits = dot < 0 ? mantissa : mantissa.Remove(dot, 1);
        int point = (dot < 0 ? mantissa.Length : dot) + exponent;
        string body = point <= 0 ? "0." + new string('0', -point) + digits
            : point >= digits.Length ? digits + new string('0', point - digits.Length)
            : digits[..point] + "." + digits[point..];
        return (negative ? "-" : "") + body;
    }
}
