using System.Globalization;
using System.Text;

namespace TaskPhrase.Evaluation;

/// <summary>HTML escaping and invariant number formatting for the audit report.</summary>
internal static class HtmlText
{
    /// <summary>Escapes text for element content and quoted attribute values (&amp; &lt; &gt; " ').</summary>
    public static string Escape(string? text)
    {
        if (string.IsNullOrEmpty(text)) return "";
        var sb = new StringBuilder(text.Length + 16);
        foreach (char c in text)
        {
            switch (c)
            {
                case '&': sb.Append("&amp;"); break;
                case '<': sb.Append("&lt;"); break;
                case '>': sb.Append("&gt;"); break;
                case '"': sb.Append("&quot;"); break;
                case '\'': sb.Append("&#39;"); break;
                default: sb.Append(c); break;
            }
        }
        return sb.ToString();
    }

    /// <summary>
    /// Renders untrusted utterance text: HTML-escaped, inside <c>&lt;bdi&gt;</c> so that bidirectional overrides cannot
    /// reorder the rest of the page, with control, format (zero-width, bidi) and lone surrogate characters shown as
    /// visible <c>U+XXXX</c> marks, and white-space-only text marked as such.
    /// </summary>
    public static string Utterance(string text)
    {
        if (text.Length == 0) return "<span class=\"mark\">(empty)</span>";
        if (string.IsNullOrWhiteSpace(text))
        {
            string points = string.Join(" ", text.Take(8).Select(c => "U+" + ((int)c).ToString("X4", CultureInfo.InvariantCulture)));
            return $"<span class=\"mark\">(white space only: {points}{(text.Length > 8 ? " …" : "")})</span>";
        }
        var sb = new StringBuilder("<bdi class=\"utt\">");
        for (int i = 0; i < text.Length; i++)
        {
            char c = text[i];
            if (char.IsHighSurrogate(c) && i + 1 < text.Length && char.IsLowSurrogate(text[i + 1]))
            {
                sb.Append(c).Append(text[i + 1]);
                i++;
            }
            else if (IsInvisible(c) || char.IsSurrogate(c))
                sb.Append("<span class=\"mark\">U+").Append(((int)c).ToString("X4", CultureInfo.InvariantCulture)).Append("</span>");
            else
                sb.Append(Escape(c.ToString()));
        }
        return sb.Append("</bdi>").ToString();
    }

    private static bool IsInvisible(char c)
        => c is not (' ') && char.GetUnicodeCategory(c) is UnicodeCategory.Control or UnicodeCategory.Format
            or UnicodeCategory.LineSeparator or UnicodeCategory.ParagraphSeparator;

    /// <summary>A number with up to <paramref name="decimals"/> decimals, invariant culture (for SVG coordinates).</summary>
    public static string N(double value, int decimals = 2)
        => Math.Round(value, decimals).ToString("0.##########", CultureInfo.InvariantCulture);

    /// <summary>A score with three decimals, or "none" for the no-score value −1.</summary>
    public static string Score(double score)
        => score == AuditEvaluator.NoScore ? "none" : score.ToString("0.000", CultureInfo.InvariantCulture);

    /// <summary>A rate as a percentage with one decimal ("n/a" when undefined).</summary>
    public static string Percent(double rate)
        => double.IsNaN(rate) ? "n/a" : (rate * 100).ToString("0.0", CultureInfo.InvariantCulture) + "&nbsp;%";

    /// <summary>A plain number with the given format, invariant culture.</summary>
    public static string Format(double value, string format)
        => double.IsNaN(value) ? "n/a" : value.ToString(format, CultureInfo.InvariantCulture);

    /// <summary>An integer, invariant culture.</summary>
    public static string Int(int value) => value.ToString(CultureInfo.InvariantCulture);
}
