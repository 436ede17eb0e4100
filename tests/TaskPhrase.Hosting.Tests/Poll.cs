namespace TaskPhrase.Hosting.Tests;

/// <summary>Bounded waiting: polls a condition until it holds or the deadline passes.</summary>
public static class Poll
{
    public static async Task<bool> UntilAsync(Func<Task<bool>> condition, TimeSpan timeout)
    {
        var deadline = DateTime.UtcNow + timeout;
        while (DateTime.UtcNow < deadline)
        {
            if (await condition()) return true;
            await Task.Delay(50);
        }
        return await condition();
    }
}
