using System.Collections.Concurrent;
using Microsoft.Extensions.Logging;

namespace TaskPhrase.Hosting.Tests.TestDoubles;

/// <summary>A logger provider that keeps every entry (category, level, rendered message, structured values) in memory.</summary>
public sealed class CapturingLoggerProvider : ILoggerProvider
{
    private readonly ConcurrentQueue<LogEntry> _entries = new();

    public IReadOnlyList<LogEntry> Entries => [.. _entries];

    public ILogger CreateLogger(string categoryName) => new Logger(categoryName, _entries);

    public void Dispose() { }

    public sealed record LogEntry(string Category, LogLevel Level, EventId EventId, string Message, IReadOnlyList<string> Values, string? Exception)
    {
        /// <summary>True when the message, any structured value or the exception text contains <paramref name="text"/>.</summary>
        public bool Mentions(string text)
            => Message.Contains(text, StringComparison.OrdinalIgnoreCase)
               || Values.Any(v => v.Contains(text, StringComparison.OrdinalIgnoreCase))
               || (Exception?.Contains(text, StringComparison.OrdinalIgnoreCase) ?? false);
    }

    private sealed class Logger(string category, ConcurrentQueue<LogEntry> entries) : ILogger
    {
        public IDisposable? BeginScope<TState>(TState state) where TState : notnull => null;

        public bool IsEnabled(LogLevel logLevel) => true;

        public void Log<TState>(LogLevel logLevel, EventId eventId, TState state, Exception? exception, Func<TState, Exception?, string> formatter)
        {
            var values = state is IEnumerable<KeyValuePair<string, object?>> pairs
                ? pairs.Select(p => $"{p.Key}={p.Value}").ToList()
                : [];
            entries.Enqueue(new LogEntry(category, logLevel, eventId, formatter(state, exception), values, exception?.ToString()));
        }
    }
}
