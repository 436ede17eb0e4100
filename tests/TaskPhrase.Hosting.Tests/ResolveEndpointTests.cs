using System.Net.Http.Headers;
using System.Text;
using System.Text.Json;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Hosting.Tests;

[Collection(ServiceTestCollection.Name)]
public class ResolveEndpointTests(ServiceFixture fixture)
{
    private ServerHarness Harbor => fixture.Harbor;

    // The keys product.md ("Command line") requires of every resolve --json object.
    private static readonly string[] RequiredKeys =
        ["utterance", "outcome", "task", "phrase", "score", "margin", "reason", "confirm", "controller", "candidates", "registry", "model"];

    [Fact]
    public async Task Resolve_ApprovedPhrase_AcceptedWithControllerBinding()
    {
        // Decision procedure step 3 (product.md): an exact approved phrase is accepted with score 1.
        // Task, binding and confirm flag as written in examples/harbor-street/registry.yaml.
        var r = await Harbor.ResolveAsync("pour hot water from the kettle into the teapot");
        foreach (var key in RequiredKeys) Assert.True(r.TryGetProperty(key, out _), $"missing key '{key}'");
        Assert.Equal("accepted", r.GetProperty("outcome").GetString());
        Assert.Equal("kettle-pour", r.GetProperty("task").GetString());
        Assert.Equal(1.0, r.GetProperty("score").GetDouble());
        Assert.True(r.GetProperty("confirm").GetBoolean());
        Assert.Equal("pour-arc.v2", r.GetProperty("controller").GetProperty("manifold").GetString());
        Assert.Equal(2, r.GetProperty("controller").GetProperty("latent_dims").GetInt32());
        Assert.Equal(JsonValueKind.Null, r.GetProperty("reason").ValueKind);
        Assert.Equal(RegistryLoader.Load(TestPaths.HarborRegistry).ContentHash, r.GetProperty("registry").GetString());
        Assert.Equal("all-minilm-l6-v2", r.GetProperty("model").GetString());
    }

    [Theory]
    [InlineData("could you give the basil a bit of water")]
    [InlineData("what's the weather like tomorrow")]
    [InlineData("don't water the basil")]
    public async Task Resolve_AnyUtterance_SameObjectAsResolutionJson(string utterance)
    {
        // The service must answer the same object as `resolve --json`, i.e. ResolutionJson.Write of the library's resolution.
        var resolver = TaskResolver.Create(RegistryLoader.Load(TestPaths.HarborRegistry), fixture.Embedder);
        var expected = JsonDocument.Parse(ResolutionJson.ToJson(resolver.Resolve(utterance))).RootElement;
        var actual = await Harbor.ResolveAsync(utterance);
        Assert.Equal(Keys(expected), Keys(actual));
        foreach (var key in Keys(expected).Where(k => k is not ("elapsed_ms" or "score" or "margin" or "candidates")))
            Assert.True(JsonElement.DeepEquals(expected.GetProperty(key), actual.GetProperty(key)), $"{key}: {expected.GetProperty(key)} vs {actual.GetProperty(key)}");
        Assert.Equal(expected.GetProperty("score").GetDouble(), actual.GetProperty("score").GetDouble(), 1e-4);
        Assert.Equal(expected.GetProperty("candidates").GetArrayLength(), actual.GetProperty("candidates").GetArrayLength());
    }

    [Fact]
    public async Task Resolve_NegatedCommand_RejectedWithReason()
    {
        // product.md step 9: a negation the approved phrases lack rejects with reason "negated".
        var r = await Harbor.ResolveAsync("please don't hang my keys on the hook");
        Assert.Equal("rejected", r.GetProperty("outcome").GetString());
        Assert.Equal("negated", r.GetProperty("reason").GetString());
        Assert.Equal(JsonValueKind.Null, r.GetProperty("task").ValueKind);
        Assert.Equal(JsonValueKind.Null, r.GetProperty("controller").ValueKind);
    }

    [Fact]
    public async Task Resolve_Batch_ResolutionsInInputOrder()
    {
        string[] utterances = ["turn on the hall light", "feed the fish", "sdfkjh qwpoeiru zxmcnv", "   "];
        using var response = await Harbor.PostResolveAsync(JsonSerializer.Serialize(new { utterances }));
        var body = await ServerHarness.ReadJsonAsync(response, 200);
        Assert.Equal(["resolutions"], Keys(body));
        var list = body.GetProperty("resolutions").EnumerateArray().ToList();
        Assert.Equal(utterances, list.Select(r => r.GetProperty("utterance").GetString()));
        foreach (var r in list)
            foreach (var key in RequiredKeys) Assert.True(r.TryGetProperty(key, out _), $"missing key '{key}'");
        Assert.Equal("hall-light", list[0].GetProperty("task").GetString());
        Assert.Equal("fish-food", list[1].GetProperty("task").GetString());
        Assert.Equal("unintelligible", list[2].GetProperty("reason").GetString());
        Assert.Equal("empty", list[3].GetProperty("reason").GetString());
    }

    [Fact]
    public async Task Resolve_BatchAtLimit_Answered_AboveLimit_413()
    {
        var atLimit = Enumerable.Range(0, TaskPhraseServerOptions.DefaultMaxBatchSize).Select(i => i % 2 == 0 ? "hall light" : "key hook").ToArray();
        using (var ok = await Harbor.PostResolveAsync(JsonSerializer.Serialize(new { utterances = atLimit })))
            Assert.Equal(atLimit.Length, (await ServerHarness.ReadJsonAsync(ok, 200)).GetProperty("resolutions").GetArrayLength());
        using var tooMany = await Harbor.PostResolveAsync(JsonSerializer.Serialize(new { utterances = atLimit.Append("hall light") }));
        var error = await ServerHarness.ReadJsonAsync(tooMany, 413);
        Assert.Equal("batch_too_large", error.GetProperty("error").GetString());
        Assert.Contains("256", error.GetProperty("message").GetString());
    }

    [Theory]
    [InlineData("{\"utterance\": \"water the basil\"", "malformed_json")]
    [InlineData("{\"utterance\": 'water the basil'}", "malformed_json")]
    [InlineData("", "malformed_json")]
    [InlineData("{}", "invalid_request")]
    [InlineData("[\"water the basil\"]", "invalid_request")]
    [InlineData("\"water the basil\"", "invalid_request")]
    [InlineData("{\"utterance\": \"\"}", "invalid_request")]
    [InlineData("{\"utterance\": 42}", "invalid_request")]
    [InlineData("{\"utterance\": null}", "invalid_request")]
    [InlineData("{\"utterance\": [\"water the basil\"]}", "invalid_request")]
    [InlineData("{\"utterances\": \"water the basil\"}", "invalid_request")]
    [InlineData("{\"utterances\": []}", "invalid_request")]
    [InlineData("{\"utterances\": [\"water the basil\", 3]}", "invalid_request")]
    [InlineData("{\"utterances\": [\"water the basil\", \"\"]}", "invalid_request")]
    [InlineData("{\"utterance\": \"a\", \"utterances\": [\"b\"]}", "invalid_request")]
    [InlineData("{\"utterance\": \"a\", \"utterance\": \"b\"}", "invalid_request")]
    [InlineData("{\"utterence\": \"water the basil\"}", "invalid_request")]
    [InlineData("{\"utterance\": \"\\ud800\"}", "malformed_json")]
    public async Task Resolve_BadBody_400WithJsonError(string body, string code)
    {
        // RFC 9110 §15.5.1: 400 Bad Request for a malformed request (RFC 8259 defines what valid JSON is).
        using var response = await Harbor.PostResolveAsync(body);
        var error = await ServerHarness.ReadJsonAsync(response, 400);
        Assert.Equal(400, error.GetProperty("status").GetInt32());
        Assert.Equal(code, error.GetProperty("error").GetString());
        Assert.False(string.IsNullOrWhiteSpace(error.GetProperty("message").GetString()));
    }

    [Fact]
    public async Task Resolve_InvalidUtf8_400MalformedJson()
    {
        var content = new ByteArrayContent([.. "{\"utterance\": \"water the "u8, 0xFF, 0xFE, .. "basil\"}"u8]);
        content.Headers.ContentType = new MediaTypeHeaderValue("application/json");
        using var response = await Harbor.Client.PostAsync("/v1/resolve", content);
        Assert.Equal("malformed_json", (await ServerHarness.ReadJsonAsync(response, 400)).GetProperty("error").GetString());
    }

    [Fact]
    public async Task Resolve_MalformedJson_MessageGivesPosition()
    {
        using var response = await Harbor.PostResolveAsync("{\n  \"utterance\": \"water the basil\",\n}");
        string message = (await ServerHarness.ReadJsonAsync(response, 400)).GetProperty("message").GetString()!;
        Assert.Contains("line 3", message);
    }

    [Theory]
    [InlineData("text/plain")]
    [InlineData("application/x-www-form-urlencoded")]
    [InlineData("application/json; charset=utf-16")]
    public async Task Resolve_WrongContentType_415(string contentType)
    {
        // RFC 9110 §15.5.16: 415 Unsupported Media Type when the content's media type is not accepted.
        using var response = await Harbor.PostResolveAsync("{\"utterance\": \"water the basil\"}", contentType);
        Assert.Equal("unsupported_media_type", (await ServerHarness.ReadJsonAsync(response, 415)).GetProperty("error").GetString());
    }

    [Fact]
    public async Task Resolve_NoContentType_415()
    {
        var content = new ByteArrayContent("{\"utterance\": \"water the basil\"}"u8.ToArray());
        using var response = await Harbor.Client.PostAsync("/v1/resolve", content);
        await ServerHarness.ReadJsonAsync(response, 415);
    }

    [Theory]
    [InlineData("application/json; charset=utf-8")]
    [InlineData("application/vnd.taskphrase+json")]
    public async Task Resolve_JsonContentTypeVariants_Accepted(string contentType)
    {
        using var response = await Harbor.PostResolveAsync("{\"utterance\": \"hall light\"}", contentType);
        Assert.Equal("hall-light", (await ServerHarness.ReadJsonAsync(response, 200)).GetProperty("task").GetString());
    }

    [Fact]
    public async Task Resolve_BodyOverLimit_413WithJsonError()
    {
        // RFC 9110 §15.5.14: 413 Content Too Large when the content is larger than the server is willing to process.
        // A valid request whose body is just over the default 64 KiB limit.
        string json = JsonSerializer.Serialize(new { utterance = "water the basil " + new string('x', TaskPhraseServerOptions.DefaultMaxBodyBytes) });
        using var response = await Harbor.PostResolveAsync(json);
        var error = await ServerHarness.ReadJsonAsync(response, 413);
        Assert.Equal("payload_too_large", error.GetProperty("error").GetString());
        Assert.Contains("65,536", error.GetProperty("message").GetString());
    }

    [Fact]
    public async Task Resolve_ChunkedBodyOverLimit_413()
    {
        // No Content-Length (chunked transfer): the limit is enforced while reading.
        byte[] json = Encoding.UTF8.GetBytes(JsonSerializer.Serialize(new { utterance = new string('a', 100_000) }));
        var content = new StreamContent(new NonSeekableStream(json));
        content.Headers.ContentType = new MediaTypeHeaderValue("application/json");
        using var request = new HttpRequestMessage(HttpMethod.Post, "/v1/resolve") { Content = content };
        request.Headers.TransferEncodingChunked = true;
        using var response = await Harbor.Client.SendAsync(request);
        Assert.Equal("payload_too_large", (await ServerHarness.ReadJsonAsync(response, 413)).GetProperty("error").GetString());
    }

    [Fact]
    public async Task Resolve_LongUtteranceUnderLimit_AnsweredAndFlaggedTruncated()
    {
        // 5,000 characters: under the body limit, over the resolver's 1,000-character input limit (flagged, never silent).
        string utterance = string.Join(' ', Enumerable.Repeat("water the basil", 330));
        var r = await Harbor.ResolveAsync(utterance);
        Assert.True(r.GetProperty("truncated").GetBoolean());
    }

    [Fact]
    public async Task UnknownPathAndWrongMethod_JsonErrors()
    {
        // RFC 9110 §15.5.5 (404 Not Found) and §15.5.6 (405 Method Not Allowed).
        using (var missing = await Harbor.Client.GetAsync("/v1/nothing-here"))
            Assert.Equal("not_found", (await ServerHarness.ReadJsonAsync(missing, 404)).GetProperty("error").GetString());
        using var wrong = await Harbor.Client.GetAsync("/v1/resolve");
        Assert.Equal("method_not_allowed", (await ServerHarness.ReadJsonAsync(wrong, 405)).GetProperty("error").GetString());
    }

    private static List<string> Keys(JsonElement e) => [.. e.EnumerateObject().Select(p => p.Name)];

    /// <summary>A read-only stream of unknown length, so HttpClient must send the body chunked.</summary>
    private sealed class NonSeekableStream(byte[] data) : MemoryStream(data)
    {
        public override bool CanSeek => false;
        public override long Length => throw new NotSupportedException();
    }
}
