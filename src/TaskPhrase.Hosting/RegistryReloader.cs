using Microsoft.Extensions.AI;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Logging.Abstractions;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Hosting;

/// <summary>
/// Owns the <see cref="TaskResolver"/> of a service and keeps its registry current: it watches the registry file
/// (debounced) and reloads on change or on <see cref="Reload()"/>. A new version is read and validated, and its
/// phrases embedded, before it is swapped in atomically; requests in flight finish on the registry they started with.
/// A broken edit keeps the old registry serving and is reported in <see cref="LastReload"/> and the log.
/// </summary>
/// <remarks>Thread-safe. Reloads are serialised. Dispose stops watching; it does not dispose the embedding generator.</remarks>
public sealed class RegistryReloader : IDisposable
{
    private readonly Func<LoadedRegistry>? _load;
    private readonly string _source;
    private readonly ILogger _logger;
    private readonly TimeSpan _debounce;
    private readonly SemaphoreSlim _gate = new(1, 1);
    private readonly CancellationTokenSource _disposing = new();
    private readonly Lock _watchLock = new();
    private FileSystemWatcher? _watcher;
    private Timer? _timer;
    private RegistryReloadStatus _last;
    private bool _disposed;

    private RegistryReloader(TaskResolver resolver, string? path, string source, Func<LoadedRegistry>? load, TimeSpan debounce, ILogger logger)
    {
        Resolver = resolver;
        SourcePath = path;
        _source = source;
        _load = load;
        _debounce = debounce;
        _logger = logger;
        _last = new RegistryReloadStatus(true, DateTimeOffset.UtcNow, resolver.Registry.ContentHash, true, null);
    }

    /// <summary>The resolver; its registry is swapped in place on reload, so keep and share this instance.</summary>
    public TaskResolver Resolver { get; }

    /// <summary>The registry (or index) file served, or null when the registry was supplied in code.</summary>
    public string? SourcePath { get; }

    /// <summary>The outcome of the latest load or reload attempt.</summary>
    public RegistryReloadStatus LastReload => Volatile.Read(ref _last);

    /// <summary>True while the file is being watched.</summary>
    public bool IsWatching { get { lock (_watchLock) return _watcher is not null; } }

    /// <summary>Raised after every reload attempt, successful or not (on the thread that reloaded).</summary>
    public event EventHandler<RegistryReloadStatus>? Reloaded;

    /// <summary>
    /// Reads the source file, validates it and creates the resolver (embedding the registry's phrases).
    /// </summary>
    /// <exception cref="Exception">Whatever the loader throws for a missing or broken file (the service does not start).</exception>
    internal static async Task<RegistryReloader> CreateAsync(string path, Func<string, LoadedRegistry> loader,
        IEmbeddingGenerator<string, Embedding<float>> generator, ResolverOptions options, TimeSpan debounce, ILogger? logger, CancellationToken cancellationToken = default)
    {
        string full = Path.GetFullPath(path);
        logger ??= NullLogger.Instance;
        var loaded = loader(full);
        var resolver = await loaded.CreateResolverAsync(generator, options, cancellationToken).ConfigureAwait(false);
        var reloader = new RegistryReloader(resolver, full, full, () => loader(full), debounce, logger);
        reloader.LogLoaded(loaded.Registry);
        return reloader;
    }

    /// <summary>Creates the resolver for a registry supplied in code (no file to watch).</summary>
    internal static async Task<RegistryReloader> CreateAsync(TaskRegistry registry, IEmbeddingGenerator<string, Embedding<float>> generator,
        ResolverOptions options, ILogger? logger, CancellationToken cancellationToken = default)
    {
        logger ??= NullLogger.Instance;
        var resolver = await TaskResolver.CreateAsync(registry, generator, options, cancellationToken).ConfigureAwait(false);
        var reloader = new RegistryReloader(resolver, null, "(registry supplied in code)", null, TimeSpan.Zero, logger);
        reloader.LogLoaded(registry);
        return reloader;
    }

    /// <summary>Re-reads the registry file now and swaps it in when it is valid (see the class remarks).</summary>
    /// <returns>The outcome; a broken file gives <see cref="RegistryReloadStatus.Succeeded"/> false and leaves the old registry in force.</returns>
    /// <exception cref="InvalidOperationException">The registry was supplied in code: use <see cref="Reload(TaskRegistry)"/>.</exception>
    public Task<RegistryReloadStatus> ReloadAsync(CancellationToken cancellationToken = default)
    {
        var load = _load ?? throw new InvalidOperationException("This registry was supplied in code and has no file to re-read; call Reload(TaskRegistry) with the new registry.");
        return RunReloadAsync(load, cancellationToken);
    }

    /// <summary>Synchronous form of <see cref="ReloadAsync(CancellationToken)"/>.</summary>
    public RegistryReloadStatus Reload() => ReloadAsync().GetAwaiter().GetResult();

    /// <summary>Swaps in <paramref name="registry"/> (its phrases are embedded first); requests in flight finish on the old one.</summary>
    public Task<RegistryReloadStatus> ReloadAsync(TaskRegistry registry, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(registry);
        return RunReloadAsync(() => LoadedRegistry.FromRegistry(registry), cancellationToken);
    }

    /// <summary>Synchronous form of <see cref="ReloadAsync(TaskRegistry, CancellationToken)"/>.</summary>
    public RegistryReloadStatus Reload(TaskRegistry registry) => ReloadAsync(registry).GetAwaiter().GetResult();

    /// <summary>
    /// Starts watching the registry file: a change (write, replace, rename into place) triggers a reload once the file
    /// has been quiet for the debounce interval. Does nothing when already watching or when there is no file.
    /// </summary>
    public void StartWatching()
    {
        if (SourcePath is null) return;
        lock (_watchLock)
        {
            ObjectDisposedException.ThrowIf(_disposed, this);
            if (_watcher is not null) return;
            string directory = Path.GetDirectoryName(SourcePath)!;
            _timer = new Timer(_ => _ = ReloadFromWatcherAsync(), null, Timeout.InfiniteTimeSpan, Timeout.InfiniteTimeSpan);
            var watcher = new FileSystemWatcher(directory, Path.GetFileName(SourcePath))
            {
                NotifyFilter = NotifyFilters.LastWrite | NotifyFilters.FileName | NotifyFilters.Size | NotifyFilters.CreationTime,
                IncludeSubdirectories = false,
            };
            watcher.Changed += OnFileEvent;
            watcher.Created += OnFileEvent;
            watcher.Renamed += OnFileEvent;
            watcher.Error += (_, e) => _logger.WatchFailed(e.GetException(), _source);
            watcher.EnableRaisingEvents = true;
            _watcher = watcher;
        }
    }

    /// <summary>Stops watching the file (a reload already running finishes).</summary>
    public void StopWatching()
    {
        lock (_watchLock)
        {
            _watcher?.Dispose();
            _watcher = null;
            _timer?.Dispose();
            _timer = null;
        }
    }

    /// <summary>Stops watching and cancels a pending or running reload (the registry in force stays).</summary>
    public void Dispose()
    {
        lock (_watchLock)
        {
            if (_disposed) return;
            _disposed = true;
        }
        StopWatching();
        _disposing.Cancel();
    }

    private void OnFileEvent(object sender, FileSystemEventArgs e)
    {
        if (!string.Equals(e.FullPath, SourcePath, StringComparison.Ordinal)) return;
        _logger.RegistryFileChanged(_source, e.ChangeType.ToString(), _debounce.TotalMilliseconds);
        lock (_watchLock) _timer?.Change(_debounce, Timeout.InfiniteTimeSpan);
    }

    private async Task ReloadFromWatcherAsync()
    {
        try
        {
            if (_load is { } load) await RunReloadAsync(load, _disposing.Token).ConfigureAwait(false);
        }
        catch (OperationCanceledException) when (_disposing.IsCancellationRequested)
        {
            // Disposed while reloading: the registry in force stays.
        }
    }

    private async Task<RegistryReloadStatus> RunReloadAsync(Func<LoadedRegistry> load, CancellationToken cancellationToken)
    {
        using var linked = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken, _disposing.Token);
        await _gate.WaitAsync(linked.Token).ConfigureAwait(false);
        RegistryReloadStatus status;
        try
        {
            string current = Resolver.Registry.ContentHash;
            try
            {
                var next = load();
                if (next.Registry.ContentHash == current)
                {
                    _logger.RegistryUnchanged(_source, current);
                    status = new RegistryReloadStatus(true, DateTimeOffset.UtcNow, current, false, null);
                }
                else
                {
                    await next.InstallAsync(Resolver, linked.Token).ConfigureAwait(false);
                    WarnOnModelMismatch(next.Registry);
                    _logger.RegistryReloaded(_source, current, next.Registry.ContentHash, next.Registry.Tasks.Count);
                    status = new RegistryReloadStatus(true, DateTimeOffset.UtcNow, next.Registry.ContentHash, true, null);
                }
            }
            catch (Exception e) when (e is not OperationCanceledException)
            {
                _logger.RegistryReloadFailed(_source, current, e.Message);
                status = new RegistryReloadStatus(false, DateTimeOffset.UtcNow, current, false, e.Message);
            }
            Volatile.Write(ref _last, status);
        }
        finally { _gate.Release(); }
        Reloaded?.Invoke(this, status);
        return status;
    }

    private void LogLoaded(TaskRegistry registry)
    {
        _logger.RegistryLoaded(registry.ContentHash, _source, registry.Tasks.Count, Resolver.Model.Id);
        WarnOnModelMismatch(registry);
    }

    private void WarnOnModelMismatch(TaskRegistry registry)
    {
        if (registry.ModelId is { Length: > 0 } tuned && !string.Equals(tuned, Resolver.Model.Id, StringComparison.OrdinalIgnoreCase))
            _logger.ModelMismatch(_source, tuned, Resolver.Model.Id);
    }
}
