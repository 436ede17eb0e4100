namespace TaskPhrase.Hosting;

/// <summary>Settings of the HTTP/JSON service (<see cref="TaskPhraseServer"/>). Validated when set.</summary>
public sealed class TaskPhraseServerOptions
{
    /// <summary>The address the service listens on unless told otherwise: <c>http://127.0.0.1:5077</c>.</summary>
    public const string DefaultUrls = "http://127.0.0.1:5077";

    /// <summary>Default request body limit: 64 KiB.</summary>
    public const int DefaultMaxBodyBytes = 64 * 1024;

    /// <summary>Default largest batch of one <c>POST /v1/resolve</c>: 256 utterances.</summary>
    public const int DefaultMaxBatchSize = 256;

    private string _urls = DefaultUrls;
    private int _maxBodyBytes = DefaultMaxBodyBytes;
    private int _maxBatchSize = DefaultMaxBatchSize;
    private TimeSpan _requestTimeout = TimeSpan.FromSeconds(10);
    private TimeSpan _shutdownTimeout = TimeSpan.FromSeconds(10);

    /// <summary>
    /// One or more <c>http://host:port</c> addresses separated by <c>;</c> (default <see cref="DefaultUrls"/>; port 0 picks a free port).
    /// Only loopback hosts (127.0.0.0/8, <c>[::1]</c>, <c>localhost</c>) are accepted unless <see cref="AllowRemote"/> is set.
    /// </summary>
    /// <exception cref="ArgumentException">Empty.</exception>
    public string Urls
    {
        get => _urls;
        set { ArgumentException.ThrowIfNullOrWhiteSpace(value); _urls = value; }
    }

    /// <summary>
    /// Allows addresses other than loopback (default false). Anyone who can reach the port can then pick the arm's
    /// task: set it only on a trusted, access-controlled network.
    /// </summary>
    public bool AllowRemote { get; set; }

    /// <summary>Largest request body in bytes (default 64 KiB); larger bodies get 413.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Below 256 or above 16 MiB.</exception>
    public int MaxBodyBytes
    {
        get => _maxBodyBytes;
        set { ArgumentOutOfRangeException.ThrowIfLessThan(value, 256); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 16 * 1024 * 1024); _maxBodyBytes = value; }
    }

    /// <summary>Largest number of utterances in one batch request (default 256); more get 400.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Below 1 or above 10,000.</exception>
    public int MaxBatchSize
    {
        get => _maxBatchSize;
        set { ArgumentOutOfRangeException.ThrowIfLessThan(value, 1); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 10_000); _maxBatchSize = value; }
    }

    /// <summary>
    /// How long one request may take, from the first byte of its body to its answer (default 10 s). A request that
    /// overruns gets 503 with error <c>timeout</c> (408 when the client was still sending its body).
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Not positive, or above 10 minutes.</exception>
    public TimeSpan RequestTimeout
    {
        get => _requestTimeout;
        set { ArgumentOutOfRangeException.ThrowIfLessThanOrEqual(value, TimeSpan.Zero); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, TimeSpan.FromMinutes(10)); _requestTimeout = value; }
    }

    /// <summary>How long a graceful shutdown (SIGTERM, Ctrl+C, <see cref="TaskPhraseServer.StopAsync"/>) waits for requests in flight (default 10 s).</summary>
    /// <exception cref="ArgumentOutOfRangeException">Negative, or above 10 minutes.</exception>
    public TimeSpan ShutdownTimeout
    {
        get => _shutdownTimeout;
        set { ArgumentOutOfRangeException.ThrowIfLessThan(value, TimeSpan.Zero); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, TimeSpan.FromMinutes(10)); _shutdownTimeout = value; }
    }

    /// <summary>The addresses of <see cref="Urls"/>, each checked: http only, no path, and loopback unless <see cref="AllowRemote"/> is set.</summary>
    /// <exception cref="ArgumentException">An address is malformed or refused; the message says which and what to do.</exception>
    public IReadOnlyList<string> GetListenAddresses() => LoopbackGuard.Check(Urls, AllowRemote);

    internal TaskPhraseServerOptions Clone() => (TaskPhraseServerOptions)MemberwiseClone();
}
