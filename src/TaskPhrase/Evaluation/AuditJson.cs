using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Unicode;

namespace TaskPhrase.Evaluation;

/// <summary>
/// Writes an <see cref="AuditReport"/> as JSON with the snake_case keys of the product design (what <c>audit --json</c>
/// prints). Deterministic: invariant number formatting, fixed key order, LF line breaks.
/// </summary>
/// <remarks>
/// <para>Top-level keys, in order: <c>suite</c>, <c>suite_path</c>, <c>registry</c> (content hash), <c>model</c> (id),
/// <c>model_sha256</c>, <c>date</c> (ISO 8601), <c>thresholds</c> (<c>accept</c>, <c>margin</c>, <c>per_task</c>),
/// <c>in_scope_accuracy</c>, <c>wrong_task_rate</c>, <c>false_reject_rate</c>, <c>false_accept_rate</c>,
/// <c>oos_recall</c>, <c>ambiguity_rate</c>, <c>auroc</c>, <c>fpr_at_95_tpr</c>, <c>counts</c>, <c>budget</c> (only
/// when a budget is given: the limits, <c>passed</c> and <c>violations</c>), <c>per_task</c>, <c>confusion</c>,
/// <c>worst_cases</c>, <c>by_kind</c>, <c>by_reason</c>, <c>threshold_sweep</c>, <c>roc</c>, <c>scores</c>,
/// <c>cases</c>.</para>
/// <para>A rate is <c>{"value": …, "count": …, "total": …, "ci_low": …, "ci_high": …}</c>. Undefined numbers (a rate
/// over zero probes, AUROC without both kinds of probe) and the +∞ threshold of the first ROC point are written as
/// <c>null</c>. A score of −1 means the resolution had no score. Text is escaped so that the JSON is safe to embed in
/// HTML (<c>&lt;</c>, <c>&gt;</c>, <c>&amp;</c>, quotes); other characters are written as themselves.</para>
/// <para>Thread-safe.</para>
/// </remarks>
public static class AuditJson
{
    private static readonly JavaScriptEncoder Encoder = JavaScriptEncoder.Create(UnicodeRanges.All);

    /// <summary>Writes <paramref name="report"/> as one JSON object to <paramref name="writer"/> (not flushed).</summary>
    /// <param name="report">The report.</param>
    /// <param name="writer">The destination.</param>
    /// <param name="budget">When given, a <c>budget</c> object with the limits and the result of <see cref="AuditReport.CheckBudgets"/>.</param>
    public static void Write(AuditReport report, Utf8JsonWriter writer, AuditBudget? budget = null)
    {
        ArgumentNullException.ThrowIfNull(report);
        ArgumentNullException.ThrowIfNull(writer);
        var ctx = report.Context;
        writer.WriteStartObject();
        writer.WriteString("suite", ctx.SuiteName);
        writer.WriteString("suite_path", ctx.SuitePath);
        writer.WriteString("registry", ctx.RegistryHash);
        writer.WriteString("model", ctx.ModelId);
        writer.WriteString("model_sha256", ctx.ModelHash);
        writer.WriteString("date", ctx.Date);

        writer.WriteStartObject("thresholds");
        Number(writer, "accept", ctx.AcceptThreshold);
        Number(writer, "margin", ctx.Margin);
        writer.WriteStartObject("per_task");
        foreach (var (task, accept) in ctx.TaskAcceptThresholds.OrderBy(p => p.Key, StringComparer.Ordinal)) Number(writer, task, accept);
        writer.WriteEndObject();
        writer.WriteEndObject();

        Rate(writer, "in_scope_accuracy", report.InScopeAccuracy);
        Rate(writer, "wrong_task_rate", report.WrongTaskRate);
        Rate(writer, "false_reject_rate", report.FalseRejectRate);
        Rate(writer, "false_accept_rate", report.FalseAcceptRate);
        Rate(writer, "oos_recall", report.OosRecall);
        Rate(writer, "ambiguity_rate", report.AmbiguityRate);
        Number(writer, "auroc", report.Auroc);
        Number(writer, "fpr_at_95_tpr", report.FprAt95Tpr);

        var c = report.Counts;
        writer.WriteStartObject("counts");
        writer.WriteNumber("probes", c.Probes);
        writer.WriteNumber("in_scope", c.InScope);
        writer.WriteNumber("out_of_scope", c.OutOfScope);
        writer.WriteNumber("accepted", c.Accepted);
        writer.WriteNumber("rejected", c.Rejected);
        writer.WriteNumber("ambiguous", c.Ambiguous);
        writer.WriteNumber("exact_matches", c.ExactMatches);
        writer.WriteNumber("truncated", c.Truncated);
        writer.WriteStartObject("by_reason");
        foreach (var reason in AuditLabels.Reasons) writer.WriteNumber(AuditLabels.Reason(reason), c.ByReason.GetValueOrDefault(reason));
        writer.WriteEndObject();
        writer.WriteEndObject();

        if (budget is not null) Budget(writer, report, budget);

        writer.WriteStartArray("per_task");
        foreach (var t in report.PerTask)
        {
            writer.WriteStartObject();
            writer.WriteString("task", t.TaskId);
            writer.WriteNumber("support", t.Support);
            writer.WriteNumber("predicted", t.Predicted);
            Rate(writer, "precision", t.Precision);
            Rate(writer, "recall", t.Recall);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();

        writer.WriteStartObject("confusion");
        Strings(writer, "expected_labels", report.Confusion.ExpectedLabels);
        Strings(writer, "actual_labels", report.Confusion.ActualLabels);
        writer.WriteStartArray("cells");
        foreach (var cell in report.Confusion.Cells)
        {
            writer.WriteStartObject();
            writer.WriteString("expected", cell.Expected);
            writer.WriteString("actual", cell.Actual);
            writer.WriteNumber("count", cell.Count);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();
        writer.WriteEndObject();

        writer.WriteStartObject("worst_cases");
        Cases(writer, "false_accepts", report.WorstFalseAccepts);
        Cases(writer, "wrong_task", report.WorstWrongTask);
        Cases(writer, "false_rejects", report.WorstFalseRejects);
        writer.WriteEndObject();

        writer.WriteStartArray("by_kind");
        foreach (var k in report.ByKind)
        {
            writer.WriteStartObject();
            writer.WriteString("kind", k.Kind);
            writer.WriteNumber("probes", k.Probes);
            writer.WriteNumber("in_scope", k.InScope);
            writer.WriteNumber("out_of_scope", k.OutOfScope);
            writer.WriteNumber("correct", k.Correct);
            Rate(writer, "rate", k.Rate);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();

        writer.WriteStartArray("by_reason");
        foreach (var r in report.ByReason)
        {
            writer.WriteStartObject();
            writer.WriteString("reason", AuditLabels.Reason(r.Reason));
            writer.WriteNumber("out_of_scope_caught", r.OutOfScopeCaught);
            writer.WriteNumber("in_scope_refused", r.InScopeRefused);
            writer.WriteNumber("total", r.Total);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();

        writer.WriteStartArray("threshold_sweep");
        foreach (var p in report.ThresholdSweep)
        {
            writer.WriteStartObject();
            Number(writer, "threshold", p.Threshold);
            Number(writer, "in_scope_accuracy", p.InScopeAccuracy);
            Number(writer, "wrong_task_rate", p.WrongTaskRate);
            Number(writer, "false_accept_rate", p.FalseAcceptRate);
            writer.WriteNumber("correct", p.Correct);
            writer.WriteNumber("wrong_task", p.WrongTask);
            writer.WriteNumber("false_accepts", p.FalseAccepts);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();

        writer.WriteStartArray("roc");
        foreach (var p in report.Roc)
        {
            writer.WriteStartObject();
            Number(writer, "fpr", p.Fpr);
            Number(writer, "tpr", p.Tpr);
            Number(writer, "threshold", p.Threshold);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();

        writer.WriteStartObject("scores");
        Numbers(writer, "in_scope", report.InScopeScores);
        Numbers(writer, "out_of_scope", report.OutOfScopeScores);
        writer.WriteEndObject();

        Cases(writer, "cases", report.Cases);
        writer.WriteEndObject();
    }

    /// <summary>Writes <paramref name="report"/> as UTF-8 JSON (no byte-order mark) to <paramref name="stream"/>, followed by a line break.</summary>
    /// <param name="report">The report.</param>
    /// <param name="stream">The destination; flushed, not closed.</param>
    /// <param name="budget">Optional budget to include (see <see cref="Write(AuditReport, Utf8JsonWriter, AuditBudget?)"/>).</param>
    /// <param name="indented">True (default) for two-space indentation; false for one line.</param>
    public static void Write(AuditReport report, Stream stream, AuditBudget? budget = null, bool indented = true)
    {
        ArgumentNullException.ThrowIfNull(stream);
        using (var writer = new Utf8JsonWriter(stream, Options(indented)))
        {
            Write(report, writer, budget);
        }
        stream.WriteByte((byte)'\n');
        stream.Flush();
    }

    /// <summary>The report as a JSON string (see <see cref="Write(AuditReport, Stream, AuditBudget?, bool)"/>).</summary>
    /// <param name="report">The report.</param>
    /// <param name="budget">Optional budget to include.</param>
    /// <param name="indented">True (default) for two-space indentation.</param>
    public static string ToJson(AuditReport report, AuditBudget? budget = null, bool indented = true)
    {
        using var stream = new MemoryStream();
        Write(report, stream, budget, indented);
        return Encoding.UTF8.GetString(stream.GetBuffer(), 0, (int)stream.Length);
    }

    private static JsonWriterOptions Options(bool indented) => new()
    {
        Indented = indented,
        IndentSize = 2,
        NewLine = "\n",
        Encoder = Encoder,
    };

    private static void Budget(Utf8JsonWriter writer, AuditReport report, AuditBudget budget)
    {
        var violations = report.CheckBudgets(budget);
        writer.WriteStartObject("budget");
        Optional(writer, "max_false_accept", budget.MaxFalseAccept);
        Optional(writer, "max_wrong_task", budget.MaxWrongTask);
        Optional(writer, "min_accuracy", budget.MinAccuracy);
        writer.WriteBoolean("use_confidence_bound", budget.UseConfidenceBound);
        writer.WriteBoolean("passed", violations.Count == 0);
        writer.WriteStartArray("violations");
        foreach (var v in violations)
        {
            writer.WriteStartObject();
            writer.WriteString("metric", v.Metric);
            Number(writer, "actual", v.Actual);
            Number(writer, "limit", v.Limit);
            writer.WriteString("message", v.Message);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();
        writer.WriteEndObject();
    }

    private static void Rate(Utf8JsonWriter writer, string name, RateEstimate rate)
    {
        writer.WriteStartObject(name);
        Number(writer, "value", rate.Value);
        writer.WriteNumber("count", rate.Count);
        writer.WriteNumber("total", rate.Total);
        Number(writer, "ci_low", rate.CiLow);
        Number(writer, "ci_high", rate.CiHigh);
        writer.WriteEndObject();
    }

    private static void Cases(Utf8JsonWriter writer, string name, IReadOnlyList<AuditCase> cases)
    {
        writer.WriteStartArray(name);
        foreach (var c in cases)
        {
            writer.WriteStartObject();
            writer.WriteNumber("line", c.Line);
            writer.WriteString("utterance", c.Utterance);
            writer.WriteString("expected", c.Expected);
            writer.WriteString("got", c.Got);
            writer.WriteString("outcome", AuditLabels.Outcome(c.Outcome));
            writer.WriteString("nearest", c.Nearest);
            Number(writer, "score", c.Score);
            if (c.Reason == Resolution.RejectionReason.None) writer.WriteNull("reason");
            else writer.WriteString("reason", AuditLabels.Reason(c.Reason));
            writer.WriteString("kind", c.Kind);
            writer.WriteEndObject();
        }
        writer.WriteEndArray();
    }

    private static void Strings(Utf8JsonWriter writer, string name, IReadOnlyList<string> values)
    {
        writer.WriteStartArray(name);
        foreach (var v in values) writer.WriteStringValue(v);
        writer.WriteEndArray();
    }

    private static void Numbers(Utf8JsonWriter writer, string name, IReadOnlyList<double> values)
    {
        writer.WriteStartArray(name);
        foreach (var v in values)
        {
            if (double.IsFinite(v)) writer.WriteNumberValue(v); else writer.WriteNullValue();
        }
        writer.WriteEndArray();
    }

    private static void Number(Utf8JsonWriter writer, string name, double value)
    {
        if (double.IsFinite(value)) writer.WriteNumber(name, value);
        else writer.WriteNull(name);
    }

    private static void Optional(Utf8JsonWriter writer, string name, double? value)
    {
        if (value is { } v) Number(writer, name, v); else writer.WriteNull(name);
    }
}
