namespace TaskPhrase.Benchmarks;

/// <summary>
/// Background threads that keep cores busy while a measurement runs (each streams over its own 8 MiB buffer, so it
/// competes for both the cores and the caches), to check how latency holds up on a loaded machine.
/// </summary>
internal sealed class CompetingLoad : IDisposable
{
    private readonly Thread[] _threads;
    private volatile bool _stop;

    public CompetingLoad(int threads)
    {
        _threads = new Thread[threads];
        for (int i = 0; i < threads; i++)
        {
            _threads[i] = new Thread(Spin) { IsBackground = true, Name = $"competing-load-{i}" };
            _threads[i].Start();
        }
    }

    public long Work { get; private set; }

    private void Spin()
    {
        var buffer = new long[1 << 20];
        long sum = 0;
        while (!_stop)
        {
            for (int i = 0; i < buffer.Length; i += 8) sum += buffer[i] += i;
        }
        Work += sum;
    }

    public void Dispose()
    {
        _stop = true;
        foreach (var t in _threads) t.Join();
    }
}
