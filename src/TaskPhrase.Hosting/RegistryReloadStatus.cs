namespace TaskPhrase.Hosting;

/// <summary>The result of the latest registry load or reload (shown by <c>GET /v1/health</c>). Immutable.</summary>
/// <param name="Succeeded">True when the file was loaded, validated and is now in force (or was unchanged).</param>
/// <param name="At">When the attempt finished.</param>
/// <param name="RegistryHash">Content hash of the registry in force after the attempt (the old one when it failed).</param>
/// <param name="Changed">True when a different registry was swapped in.</param>
/// <param name="Error">What was wrong with the file when the attempt failed (file, line and column where known); null on success.</param>
public sealed record RegistryReloadStatus(bool Succeeded, DateTimeOffset At, string RegistryHash, bool Changed, string? Error);
