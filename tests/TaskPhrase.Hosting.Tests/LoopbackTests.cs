namespace TaskPhrase.Hosting.Tests;

public class LoopbackTests
{
    // 0.0.0.0 and :: are "this host, any address" (RFC 1122 §3.2.1.3, RFC 4291 §2.5.2): every interface, not loopback.
    [Theory]
    [InlineData("http://0.0.0.0:5077")]
    [InlineData("http://*:5077")]
    [InlineData("http://+:5077")]
    [InlineData("http://[::]:5077")]
    [InlineData("http://192.168.1.20:5077")]
    [InlineData("http://robot-arm.local:5077")]
    [InlineData("http://127.0.0.1:5077;http://0.0.0.0:5078")]
    public void Create_NonLoopbackAddress_RefusedWithClearMessage(string urls)
    {
        var e = Assert.Throws<ArgumentException>(() => TaskPhraseServer.Create(new TaskPhraseServerOptions { Urls = urls }));
        Assert.Contains("not a loopback address", e.Message);
        Assert.Contains("--allow-remote", e.Message);
    }

    // Loopback: all of 127.0.0.0/8 (RFC 1122 §3.2.1.3), ::1 (RFC 4291 §2.5.3) and the name localhost (RFC 6761 §6.3).
    [Theory]
    [InlineData("http://127.0.0.1:5077")]
    [InlineData("http://127.4.5.6:5077")]
    [InlineData("http://[::1]:5077")]
    [InlineData("http://localhost:5077")]
    [InlineData("http://LOCALHOST:5077")]
    public void IsLoopback_LoopbackHosts_True(string url) => Assert.True(LoopbackGuard.IsLoopback(url));

    [Fact]
    public async Task Create_NonLoopbackWithAllowRemote_Builds()
    {
        // Only built, never started: nothing listens on a non-loopback address in tests.
        await using var server = TaskPhraseServer.Create(new TaskPhraseServerOptions { Urls = "http://0.0.0.0:5077", AllowRemote = true });
        Assert.Empty(server.Addresses);
    }

    [Theory]
    [InlineData("https://127.0.0.1:5077", "plain http")]
    [InlineData("http://127.0.0.1:5077/api", "cannot have a path")]
    [InlineData("127.0.0.1:5077", "not a valid listen address")]
    public void Create_UnusableAddress_Refused(string urls, string expected)
    {
        var e = Assert.Throws<ArgumentException>(() => TaskPhraseServer.Create(new TaskPhraseServerOptions { Urls = urls }));
        Assert.Contains(expected, e.Message);
    }

    [Fact]
    public void Options_OutOfRangeLimits_Throw()
    {
        var options = new TaskPhraseServerOptions();
        Assert.Throws<ArgumentOutOfRangeException>(() => options.MaxBodyBytes = 100);
        Assert.Throws<ArgumentOutOfRangeException>(() => options.MaxBatchSize = 0);
        Assert.Throws<ArgumentOutOfRangeException>(() => options.RequestTimeout = TimeSpan.Zero);
        Assert.Equal(64 * 1024, options.MaxBodyBytes);
        Assert.Equal("http://127.0.0.1:5077", options.Urls);
    }
}
