using System.Text.Json;
using Microsoft.Extensions.Logging;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class LoggingTests(ServiceFixture fixture)
{
    [Fact]
    public async Task Log_ResolvedAndRefusedUtterances_NeverAboveTrace()
    {
        // Utterances are personal data (what a person asked their arm to do): only Trace may carry them.
        using var file = new TempRegistry(TempRegistry.ThreeTasks);
        await using var server = await ServerHarness.StartAsync(fixture.Embedder, tp => tp.Configure(o => o.RegistryPath = file.Path));
        const string Secret = "zanzibar-medication-7731";
        string[] sent =
        [
            $"water the basil and the {Secret}",
            $"don't feed the fish {Secret}",
        ];
        foreach (var u in sent) await server.ResolveAsync(u);
        using (var batch = await server.PostResolveAsync(JsonSerializer.Serialize(new { utterances = new[] { $"hall light {Secret}", "feed the fish" } })))
            await ServerHarness.ReadJsonAsync(batch, 200);
        // Refused requests that carry the text: wrong type elsewhere, unknown field, malformed JSON, too large.
        using (var bad = await server.PostResolveAsync($"{{\"utterances\": [\"{Secret}\", 5]}}")) await ServerHarness.ReadJsonAsync(bad, 400);
        using (var bad = await server.PostResolveAsync($"{{\"utterance\": \"{Secret}\", \"extra\": 1}}")) await ServerHarness.ReadJsonAsync(bad, 400);
        using (var bad = await server.PostResolveAsync($"{{\"utterance\": \"{Secret}\"")) await ServerHarness.ReadJsonAsync(bad, 400);
        using (var bad = await server.PostResolveAsync($"{{\"utterance\": \"{Secret}\"}}", "text/plain")) await ServerHarness.ReadJsonAsync(bad, 415);

        var entries = server.Logs.Entries;
        // The capture works and the text is really there at Trace (so the check below can fail).
        Assert.Contains(entries, e => e.Level == LogLevel.Trace && e.Mentions(Secret));
        Assert.Contains(entries, e => e.Level == LogLevel.Debug && e.Category.StartsWith("TaskPhrase"));
        var leaks = entries.Where(e => e.Level > LogLevel.Trace && e.Mentions(Secret)).ToList();
        Assert.True(leaks.Count == 0, string.Join(Environment.NewLine, leaks.Select(l => $"{l.Level} {l.Category}: {l.Message}")));
    }
}
