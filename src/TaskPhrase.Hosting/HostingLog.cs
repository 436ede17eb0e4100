using Microsoft.Extensions.Logging;

namespace TaskPhrase.Hosting;

/// <summary>
/// The log messages of TaskPhrase.Hosting (source-generated). User utterances are personal data: only
/// <see cref="UtteranceResolved"/> carries one, and it is logged at <see cref="LogLevel.Trace"/> only.
/// </summary>
internal static partial class HostingLog
{
    [LoggerMessage(EventId = 1, Level = LogLevel.Information, Message = "Registry {RegistryHash} loaded from {Source}: {TaskCount} tasks, model {ModelId}.")]
    public static partial void RegistryLoaded(this ILogger logger, string registryHash, string source, int taskCount, string modelId);

    [LoggerMessage(EventId = 2, Level = LogLevel.Information, Message = "Registry reloaded from {Source}: {OldHash} -> {NewHash}, {TaskCount} tasks.")]
    public static partial void RegistryReloaded(this ILogger logger, string source, string oldHash, string newHash, int taskCount);

    [LoggerMessage(EventId = 3, Level = LogLevel.Debug, Message = "Registry {Source} is unchanged (hash {RegistryHash}); nothing to swap.")]
    public static partial void RegistryUnchanged(this ILogger logger, string source, string registryHash);

    [LoggerMessage(EventId = 4, Level = LogLevel.Error, Message = "Registry reload from {Source} failed; still serving registry {RegistryHash}. Fix the file and save it again. {Error}")]
    public static partial void RegistryReloadFailed(this ILogger logger, string source, string registryHash, string error);

    [LoggerMessage(EventId = 5, Level = LogLevel.Warning, Message = "Registry {Source} says its thresholds were tuned for model {RegistryModel}, but the service embeds with {ModelId}; re-tune and re-audit before relying on them.")]
    public static partial void ModelMismatch(this ILogger logger, string source, string registryModel, string modelId);

    [LoggerMessage(EventId = 6, Level = LogLevel.Debug, Message = "Registry file {Source} changed ({ChangeType}); reloading after {DebounceMs} ms of quiet.")]
    public static partial void RegistryFileChanged(this ILogger logger, string source, string changeType, double debounceMs);

    [LoggerMessage(EventId = 7, Level = LogLevel.Error, Message = "Watching registry file {Source} failed; changes are no longer picked up until the service restarts or Reload() is called.")]
    public static partial void WatchFailed(this ILogger logger, Exception exception, string source);

    [LoggerMessage(EventId = 10, Level = LogLevel.Information, Message = "TaskPhrase service listening on {Urls}.")]
    public static partial void Listening(this ILogger logger, string urls);

    [LoggerMessage(EventId = 11, Level = LogLevel.Warning, Message = "TaskPhrase service listens on {Urls}, which other machines may reach (AllowRemote is set). Anyone who can reach the port can choose the arm's task.")]
    public static partial void ListeningRemotely(this ILogger logger, string urls);

    [LoggerMessage(EventId = 20, Level = LogLevel.Debug, Message = "Resolved {Count} utterance(s) in {ElapsedMs:0.0} ms: {Accepted} accepted, {Rejected} rejected, {Ambiguous} ambiguous.")]
    public static partial void Resolved(this ILogger logger, int count, double elapsedMs, int accepted, int rejected, int ambiguous);

    /// <summary>The only message that carries user text: Trace level only (personal data).</summary>
    [LoggerMessage(EventId = 21, Level = LogLevel.Trace, Message = "Utterance {Utterance} -> {Outcome} {Task} {Reason}.")]
    public static partial void UtteranceResolved(this ILogger logger, string utterance, string outcome, string? task, string? reason);

    [LoggerMessage(EventId = 22, Level = LogLevel.Debug, Message = "Request refused with {Status} {Code}: {Reason}")]
    public static partial void RequestRefused(this ILogger logger, int status, string code, string reason);

    [LoggerMessage(EventId = 23, Level = LogLevel.Warning, Message = "A resolve request of {Count} utterance(s) overran the {TimeoutMs} ms request timeout and was answered with 503.")]
    public static partial void RequestTimedOut(this ILogger logger, int count, double timeoutMs);

    [LoggerMessage(EventId = 24, Level = LogLevel.Error, Message = "A resolve request failed ({ExceptionType}); answered 500.")]
    public static partial void ResolveFailed(this ILogger logger, string exceptionType);
}
