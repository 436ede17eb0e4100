using System.Collections.Concurrent;
using System.Text.Json;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class ConcurrencyTests(ServiceFixture fixture)
{
    [Fact]
    public async Task Resolve_EightClientsFiftyRequestsEach_NoFailuresAndConsistentAnswers()
    {
        // Utterances from the Harbor Street probe suite (examples/harbor-street/probes.csv), first column.
        var utterances = File.ReadLines(TestPaths.Example("harbor-street", "probes.csv")).Skip(1)
            .Select(line => line.Split(',')[0]).Where(u => u.Length > 0 && !u.StartsWith('"')).Take(40).ToArray();
        Assert.True(utterances.Length >= 20);
        var failures = new ConcurrentQueue<string>();
        var answers = new ConcurrentDictionary<string, ConcurrentBag<string>>();
        const int clients = 8, requests = 50;
        using var cts = new CancellationTokenSource(TimeSpan.FromMinutes(2));
        var tasks = Enumerable.Range(0, clients).Select(c => Task.Run(async () =>
        {
            // Each client has its own connection pool, like separate processes of a robot stack.
            using var client = new HttpClient { BaseAddress = fixture.Harbor.BaseAddress, Timeout = TimeSpan.FromSeconds(30) };
            for (int i = 0; i < requests && !cts.IsCancellationRequested; i++)
            {
                string utterance = utterances[(c * 7 + i) % utterances.Length];
                try
                {
                    using var response = await client.PostAsync("/v1/resolve",
                        new StringContent(JsonSerializer.Serialize(new { utterance }), System.Text.Encoding.UTF8, "application/json"), cts.Token);
                    string body = await response.Content.ReadAsStringAsync(cts.Token);
                    if (!response.IsSuccessStatusCode) { failures.Enqueue($"{(int)response.StatusCode}: {body}"); continue; }
                    using var doc = JsonDocument.Parse(body);
                    var root = doc.RootElement;
                    if (root.GetProperty("utterance").GetString() != utterance) failures.Enqueue("answer for another utterance");
                    answers.GetOrAdd(utterance, _ => []).Add($"{root.GetProperty("outcome").GetString()}/{root.GetProperty("task").GetString()}/{root.GetProperty("reason").GetString()}");
                }
                catch (Exception e) when (e is HttpRequestException or TaskCanceledException)
                {
                    failures.Enqueue(e.Message);
                }
            }
        })).ToArray();
        await Task.WhenAll(tasks);
        Assert.Empty(failures);
        Assert.Equal(clients * requests, answers.Values.Sum(b => b.Count));
        // The same utterance always gets the same decision, however many requests run at once.
        foreach (var (utterance, seen) in answers) Assert.True(seen.Distinct().Count() == 1, $"{utterance}: {string.Join(", ", seen.Distinct())}");
    }
}
