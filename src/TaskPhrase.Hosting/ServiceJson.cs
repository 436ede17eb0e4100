using System.Text.Json;
using TaskPhrase.Embedding;
using TaskPhrase.Resolution;

namespace TaskPhrase.Hosting;

/// <summary>The JSON bodies of the service other than resolutions (which <see cref="ResolutionJson"/> writes). snake_case keys.</summary>
internal static class ServiceJson
{
    public static void WriteError(Utf8JsonWriter w, int status, string code, string message)
    {
        w.WriteStartObject();
        w.WriteNumber("status", status);
        w.WriteString("error", code);
        w.WriteString("message", message);
        w.WriteEndObject();
    }

    public static void WriteBatch(Utf8JsonWriter w, IReadOnlyList<Resolution.Resolution> results)
    {
        w.WriteStartObject();
        w.WriteStartArray("resolutions");
        foreach (var r in results) ResolutionJson.Write(w, r);
        w.WriteEndArray();
        w.WriteEndObject();
    }

    public static void WriteHealth(Utf8JsonWriter w, RegistryReloader reloader, TimeSpan uptime)
    {
        var registry = reloader.Resolver.Registry;
        var model = reloader.Resolver.Model;
        var last = reloader.LastReload;
        w.WriteStartObject();
        // "degraded": still serving, but the latest edit of the registry file was refused.
        w.WriteString("status", last.Succeeded ? "ok" : "degraded");
        w.WriteString("registry", registry.ContentHash);
        WriteStringOrNull(w, "registry_path", reloader.SourcePath);
        w.WriteNumber("tasks", registry.Tasks.Count);
        WriteModel(w, model);
        w.WriteNumber("uptime_s", Math.Round(uptime.TotalSeconds, 3));
        w.WriteBoolean("watching", reloader.IsWatching);
        w.WriteStartObject("last_reload");
        w.WriteBoolean("ok", last.Succeeded);
        w.WriteString("at", last.At);
        w.WriteBoolean("changed", last.Changed);
        w.WriteString("registry", last.RegistryHash);
        WriteStringOrNull(w, "error", last.Error);
        w.WriteEndObject();
        w.WriteEndObject();
    }

    public static void WriteRegistry(Utf8JsonWriter w, RegistryReloader reloader)
    {
        var registry = reloader.Resolver.Registry;
        w.WriteStartObject();
        w.WriteString("registry", registry.ContentHash);
        WriteStringOrNull(w, "registry_path", reloader.SourcePath);
        WriteStringOrNull(w, "tuned_for_model", registry.ModelId);
        WriteModel(w, reloader.Resolver.Model);
        w.WriteStartArray("tasks");
        foreach (var task in registry.Tasks)
        {
            w.WriteStartObject();
            w.WriteString("id", task.Id);
            w.WriteString("title", task.Title);
            w.WriteBoolean("confirm", task.Confirm);
            w.WriteStartObject("controller");
            w.WriteString("manifold", task.Controller.Manifold);
            w.WriteNumber("latent_dims", task.Controller.LatentDims);
            WriteStringOrNull(w, "decoder", task.Controller.Decoder);
            w.WriteEndObject();
            w.WriteNumber("phrases", task.Phrases.Count);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteEndObject();
    }

    private static void WriteModel(Utf8JsonWriter w, EmbeddingModelInfo model)
    {
        w.WriteString("model", model.Id);
        w.WriteString("model_sha256", model.Sha256);
        w.WriteNumber("dimensions", model.Dimensions);
    }

    private static void WriteStringOrNull(Utf8JsonWriter w, string name, string? value)
    {
        if (value is null) w.WriteNull(name); else w.WriteString(name, value);
    }
}
