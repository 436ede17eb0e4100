using TaskPhrase.Conditioning;
using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using TaskPhrase.Text;

namespace TaskPhrase.Tests.Resolution;

/// <summary>
/// Named hostile utterances through <see cref="TaskResolver.Resolve"/> with the real model, each with the expected
/// decision, and null arguments from code, which must be <see cref="ArgumentNullException"/> naming the parameter.
/// </summary>
[Collection(ModelCollection.Name)]
public class HostileUtteranceTests(ModelFixture fixture)
{
    private static readonly string Long20k = string.Concat(Enumerable.Repeat("water the basil ", 1250)); // 20,000 characters

    /// <summary>
    /// Expected: "exact:TASK" (accepted by exact match), "reason:REASON" (rejected with that reason),
    /// "not-accepted", "not-exact" (any valid outcome but never an exact match), "truncated" (flagged, any outcome).
    /// </summary>
    public static TheoryData<string, string, string> Cases() => new()
    {
        { "nul only", "\u0000", "reason:Empty" },
        { "controls only", "\u0001\u0007\u001B[31m\u007F\u0085\u009B", "reason:Unintelligible" },
        { "zero-width only", "\u200B\u200C\u200D\u2060\uFEFF", "reason:Empty" },
        { "nul inside a phrase", "water the\u0000 basil", "exact:water-basil" },
        { "zero-width inside words", "wa\u200Bter the ba\u200Dsil", "exact:water-basil" },
        { "soft hyphens", "wa\u00ADter the ba\u00ADsil", "exact:water-basil" },
        // Bidi controls are format characters: dropped, the logical order is what was typed or spoken.
        { "bidi override around a phrase", "\u202Ewater the basil\u202C", "exact:water-basil" },
        { "bidi isolates", "\u2067feed\u2069 the \u2066fish\u2069", "exact:fish-food" },
        // Displays as "water the basil" under the right-to-left override, but the characters say otherwise.
        { "visually spoofed reversal", "\u202Elisab eht retaw", "not-exact" },
        { "lone high surrogate", "water the basil\uD800", "exact:water-basil" },
        { "lone low surrogate", "\uDC00feed the fish", "exact:fish-food" },
        { "noncharacter U+FFFE", "water the\uFFFE basil", "exact:water-basil" },
        // UAX #15: NFKC maps fullwidth forms to ASCII.
        { "fullwidth letters", "\uFF57\uFF41\uFF54\uFF45\uFF52 \uFF54\uFF48\uFF45 \uFF42\uFF41\uFF53\uFF49\uFF4C", "exact:water-basil" },
        { "cyrillic homoglyph", "w\u0430ter the basil", "not-exact" },
        { "combining stack", "w\u0334\u0322a\u0337t\u0338e\u0335r\u0336 t\u0334h\u0338e\u0335 b\u0336a\u0334s\u0338i\u0337l\u0335", "not-exact" },
        { "emoji only", "\U0001F33F\U0001F4A7\U0001F33F", "reason:Unintelligible" },
        { "emoji zwj sequence", "\U0001F469\u200D\U0001F373\U0001F469\u200D\U0001F373", "reason:Unintelligible" },
        { "mixed scripts", "water the \u0431\u0430\u0437\u0438\u043B\u0438\u043A \u6C34 \u0628\u0627\u0632\u0644\u0627\u0621", "not-exact" },
        { "script tag", "<script>alert('water the basil')</script>", "not-exact" },
        { "sql injection", "'; DROP TABLE tasks; --", "not-accepted" },
        { "template injection", "{{7*7}}", "reason:Unintelligible" },
        { "format string", "%s%s%s%n %x", "not-accepted" },
        { "escaped nul text", "\\u0000", "not-accepted" },
        { "json breaking", "\"},{\"outcome\":\"accepted\",\"task\":\"kettle-pour", "not-exact" },
        { "newlines inside", "feed\nthe\r\nfish", "exact:fish-food" },
        { "20,000 characters", Long20k, "truncated" },
        { "20,000 spaces then a phrase", new string(' ', 20_000) + "feed the fish", "exact:fish-food" },
    };

    private TaskResolver Resolver() => TaskResolver.Create(HarborMini.Registry(), fixture.Embedder);

    [Theory]
    [MemberData(nameof(Cases))]
    public void Resolve_HostileUtterance_GivesTheExpectedDecision(string name, string utterance, string expected)
    {
        var r = Resolver().Resolve(utterance);
        TaskResolverPropertyTests.AssertValidPair(r);
        string got = $"{r.Outcome}/{r.Reason}/{r.Task?.Id}/exact={r.ExactMatch}";
        switch (expected.Split(':'))
        {
            case ["exact", var task]:
                Assert.True(r.ExactMatch && r.Outcome == ResolutionOutcome.Accepted && r.Task?.Id == task, $"{name}: {got}");
                break;
            case ["reason", var reason]:
                Assert.True(r.Outcome == ResolutionOutcome.Rejected && r.Reason.ToString() == reason, $"{name}: {got}");
                break;
            case ["not-accepted"]:
                Assert.True(r.Outcome != ResolutionOutcome.Accepted, $"{name}: {got}");
                break;
            case ["not-exact"]:
                Assert.False(r.ExactMatch, $"{name}: {got}");
                break;
            case ["truncated"]:
                Assert.True(r.Truncated, $"{name}: {got}");
                Assert.Equal(new ResolverOptions().MaxInputChars, r.Normalized.Length);
                break;
            default:
                Assert.Fail($"unknown expectation {expected}");
                break;
        }
        Assert.Equal(utterance, r.Utterance);
        Assert.NotEmpty(ResolutionJson.ToJson(r));
    }

    [Fact]
    public void ResolveMany_HostileTable_MatchesResolveOneByOne()
    {
        var resolver = Resolver();
        var texts = Cases().Select(row => (string)row[1]).ToList();
        var many = resolver.ResolveMany(texts);
        for (int i = 0; i < texts.Count; i++)
        {
            var one = resolver.Resolve(texts[i]);
            Assert.Equal((one.Outcome, one.Reason, one.Task?.Id, one.Truncated), (many[i].Outcome, many[i].Reason, many[i].Task?.Id, many[i].Truncated));
        }
    }

    [Fact]
    public void Resolve_Null_ThrowsNamingUtterance()
        => Assert.Equal("utterance", Assert.Throws<ArgumentNullException>(() => Resolver().Resolve(null!)).ParamName);

    [Fact]
    public async Task ResolveAsync_Null_ThrowsNamingUtterance()
        => Assert.Equal("utterance", (await Assert.ThrowsAsync<ArgumentNullException>(() => Resolver().ResolveAsync(null!))).ParamName);

    [Fact]
    public void ResolveMany_NullList_ThrowsNamingUtterances()
        => Assert.Equal("utterances", Assert.Throws<ArgumentNullException>(() => Resolver().ResolveMany(null!)).ParamName);

    [Fact]
    public void ResolveMany_NullItem_ThrowsNamingUtterancesAndPosition()
    {
        var e = Assert.Throws<ArgumentException>(() => Resolver().ResolveMany(["feed the fish", null!]));
        Assert.Equal("utterances", e.ParamName);
        Assert.Contains("Utterance 1 is null", e.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Rank_Null_ThrowsNamingUtterance()
        => Assert.Equal("utterance", Assert.Throws<ArgumentNullException>(() => Resolver().Rank(null!)).ParamName);

    [Fact]
    public void Create_NullArguments_ThrowNamingTheParameter()
    {
        Assert.Equal("registry", Assert.Throws<ArgumentNullException>(() => TaskResolver.Create(null!, fixture.Embedder)).ParamName);
        Assert.Equal("generator", Assert.Throws<ArgumentNullException>(() => TaskResolver.Create(HarborMini.Registry(), null!)).ParamName);
        Assert.Equal("index", Assert.Throws<ArgumentNullException>(() => TaskResolver.FromIndex(null!, fixture.Embedder)).ParamName);
    }

    public static TheoryData<string, string, Action> NullLoaderCalls() => new()
    {
        { "RegistryLoader.Load", "path", () => RegistryLoader.Load(null!) },
        { "RegistryLoader.TryLoad", "path", () => RegistryLoader.TryLoad(null!) },
        { "RegistryLoader.Parse yaml", "yaml", () => RegistryLoader.Parse(null!, "x.yaml") },
        { "RegistryLoader.Parse source", "sourceName", () => RegistryLoader.Parse("version: 1", null!) },
        { "RegistryCanonicalForm.FromJson", "json", () => RegistryCanonicalForm.FromJson(null!) },
        { "ProbeSuite.Load", "path", () => ProbeSuite.Load(null!) },
        { "ProbeSuite.Parse", "reader", () => ProbeSuite.Parse(null!, "x.csv") },
        { "TaskIndex.Load", "path", () => TaskIndex.Load(null!) },
        { "SafeTensorsFile.Open", "path", () => SafeTensorsFile.Open(null!) },
        { "SafeTensorsFile.FromStream", "stream", () => SafeTensorsFile.FromStream(null!, "x") },
        { "FilmGenerator.Load", "path", () => FilmGenerator.Load(null!, 384) },
        { "TextNormalizer.MatchKey", "text", () => TextNormalizer.MatchKey(null!) },
    };

    [Theory]
    [MemberData(nameof(NullLoaderCalls))]
    public void Loader_Null_ThrowsArgumentNullNamingTheParameter(string member, string parameter, Action call)
    {
        var e = Assert.Throws<ArgumentNullException>(call);
        Assert.True(e.ParamName == parameter, $"{member}: ParamName is '{e.ParamName}', expected '{parameter}'");
    }
}
