using System.Text.Json;

namespace TaskPhrase.Resolution;

/// <summary>
/// Writes a <see cref="Resolution"/> as the JSON object of the command-line tool and the service
/// (snake_case keys: <c>utterance</c>, <c>outcome</c>, <c>task</c>, <c>phrase</c>, <c>score</c>, <c>margin</c>,
/// <c>reason</c>, <c>confirm</c>, <c>controller</c>, <c>candidates</c>, <c>registry</c>, <c>model</c>, …).
/// </summary>
public static class ResolutionJson
{
    /// <summary>The wire name of an outcome: <c>accepted</c>, <c>rejected</c>, <c>ambiguous</c>.</summary>
    public static string Name(ResolutionOutcome outcome) => outcome switch
    {
        ResolutionOutcome.Accepted => "accepted",
        ResolutionOutcome.Rejected => "rejected",
        ResolutionOutcome.Ambiguous => "ambiguous",
        _ => throw new ArgumentOutOfRangeException(nameof(outcome)),
    };

    /// <summary>The wire name of a reason (<c>out_of_scope</c>, <c>look_alike</c>, …), or null for <see cref="RejectionReason.None"/>.</summary>
    public static string? Name(RejectionReason reason) => reason switch
    {
        RejectionReason.None => null,
        RejectionReason.Empty => "empty",
        RejectionReason.Unintelligible => "unintelligible",
        RejectionReason.OutOfScope => "out_of_scope",
        RejectionReason.Ambiguous => "ambiguous",
        RejectionReason.LookAlike => "look_alike",
        RejectionReason.Negated => "negated",
        RejectionReason.Hazard => "hazard",
        _ => throw new ArgumentOutOfRangeException(nameof(reason)),
    };

    /// <summary>Writes one resolution as a JSON object.</summary>
    public static void Write(Utf8JsonWriter writer, Resolution r)
    {
        ArgumentNullException.ThrowIfNull(writer);
        ArgumentNullException.ThrowIfNull(r);
        bool accepted = r.Outcome == ResolutionOutcome.Accepted;
        writer.WriteStartObject();
        writer.WriteString("utterance", r.Utterance);
        writer.WriteString("outcome", Name(r.Outcome));
        // The task and its binding are given only when accepted: an app must never switch controllers otherwise.
        WriteStringOrNull(writer, "task", accepted ? r.Task?.Id : null);
        WriteStringOrNull(writer, "title", accepted ? r.Task?.Title : null);
        WriteStringOrNull(writer, "phrase", accepted ? r.Phrase : null);
        WriteNumberOrNull(writer, "score", r.Score);
        WriteNumberOrNull(writer, "margin", r.Margin);
        WriteStringOrNull(writer, "reason", Name(r.Reason));
        WriteStringOrNull(writer, "detail", r.Detail);
        writer.WriteBoolean("confirm", r.Confirm);
        if (accepted && r.Task is { } task)
        {
            writer.WriteStartObject("controller");
            writer.WriteString("manifold", task.Controller.Manifold);
            writer.WriteNumber("latent_dims", task.Controller.LatentDims);
            WriteStringOrNull(writer, "decoder", task.Controller.Decoder);
            writer.WriteEndObject();
        }
        else writer.WriteNull("controller");
        WriteStringOrNull(writer, "nearest_task", r.Task?.Id);
        writer.WriteStartArray("candidates");
        foreach (var c in r.Candidates)
        {
            writer.WriteStartObject();
            writer.WriteString("task", c.TaskId);
            writer.WriteString("phrase", c.Phrase);
            writer.WriteNumber("score", Math.Round(c.Score, 6));
            writer.WriteEndObject();
        }
        writer.WriteEndArray();
        writer.WriteBoolean("exact_match", r.ExactMatch);
        writer.WriteBoolean("truncated", r.Truncated);
        writer.WriteStartArray("uncovered_words");
        foreach (var w in r.UncoveredWords) writer.WriteStringValue(w);
        writer.WriteEndArray();
        writer.WriteStartArray("corrections");
        foreach (var c in r.Corrections) writer.WriteStringValue(c);
        writer.WriteEndArray();
        WriteStringOrNull(writer, "hazard_word", r.HazardWord);
        WriteStringOrNull(writer, "negation_cue", r.NegationCue);
        if (accepted && r.Conditioning is { } film)
        {
            writer.WritePropertyName("conditioning");
            film.WriteJson(writer);
        }
        writer.WriteString("registry", r.RegistryHash);
        writer.WriteString("model", r.ModelId);
        writer.WriteNumber("elapsed_ms", Math.Round(r.Elapsed.TotalMilliseconds, 3));
        writer.WriteEndObject();
    }

    /// <summary>One resolution as a compact JSON string (one line).</summary>
    public static string ToJson(Resolution r)
    {
        using var stream = new MemoryStream();
        using (var writer = new Utf8JsonWriter(stream)) Write(writer, r);
        return System.Text.Encoding.UTF8.GetString(stream.ToArray());
    }

    private static void WriteStringOrNull(Utf8JsonWriter w, string name, string? value)
    {
        if (value is null) w.WriteNull(name); else w.WriteString(name, value);
    }

    private static void WriteNumberOrNull(Utf8JsonWriter w, string name, float? value)
    {
        if (value is { } v) w.WriteNumber(name, Math.Round(v, 6)); else w.WriteNull(name);
    }
}
