using System.Text;
using System.Text.Json;
using TaskPhrase.Cli.Commands;

namespace TaskPhrase.Cli.Tests;

/// <summary>
/// Hostile utterances through <c>taskphrase resolve</c> in-process: invalid UTF-8 on <c>--input</c> is replaced and
/// reported on standard error with its line number, every other line still gets exactly one JSON Lines object, and
/// nothing in an utterance can drive the terminal in human output.
/// </summary>
[Collection(CliModelCollection.Name)]
public sealed class HostileInputTests(CliModelFixture fixture) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-cli-hostile-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    private static readonly string Registry = CliHarness.Data("registries", "valid", "small.yaml");

    /// <summary>The input lines as bytes; the comment names what each line is.</summary>
    private static byte[] HostileInput()
    {
        var lines = new List<byte[]>
        {
            Encoding.UTF8.GetBytes("water the basil"),                                   // 1 plain approved phrase
            Join(Encoding.UTF8.GetBytes("give the basil "), [0xFF, 0xFE], Encoding.UTF8.GetBytes(" a drink")), // 2 invalid UTF-8 bytes
            Join([0xED, 0xA0, 0x80], Encoding.UTF8.GetBytes(" turn on the hall light")),   // 3 an encoded lone surrogate (invalid in UTF-8)
            Join([0x00, 0x01, 0x1B], Encoding.UTF8.GetBytes("[2J press the hall light switch")), // 4 NUL, control and an ANSI escape
            Encoding.UTF8.GetBytes("wa\u200Bter the ba\u200Dsil"),                        // 5 zero-width characters
            Encoding.UTF8.GetBytes("\u202Ewater the basil\u202C"),                        // 6 bidi override
            Encoding.UTF8.GetBytes(string.Concat(Enumerable.Repeat("pour the kettle ", 1250))), // 7 a 20,000-character line
            Encoding.UTF8.GetBytes("\U0001F33F\U0001F4A7\U0001F33F"),                     // 8 emoji only
            Encoding.UTF8.GetBytes("water the \u0431\u0430\u0437\u0438\u043B\u0438\u043A \u6C34"), // 9 mixed scripts
            Encoding.UTF8.GetBytes("<script>alert('x')</script>"),                        // 10 markup
            Encoding.UTF8.GetBytes("'; DROP TABLE tasks; --"),                            // 11 SQL-looking
            Encoding.UTF8.GetBytes("{{7*7}}"),                                            // 12 template-looking
            Encoding.UTF8.GetBytes("\\u0000"),                                            // 13 an escaped NUL as text
            Encoding.UTF8.GetBytes("[red]hazard[/] [link=file:///etc/passwd]x[/]"),       // 14 console markup
        };
        var all = new List<byte>();
        foreach (var line in lines) all.AddRange([.. line, (byte)'\n']);
        return [.. all];
    }

    private static byte[] Join(params byte[][] parts) => parts.SelectMany(p => p).ToArray();

    private static List<JsonElement> JsonLines(string stdout)
        => stdout.Split('\n', StringSplitOptions.RemoveEmptyEntries).Select(l => JsonDocument.Parse(l).RootElement).ToList();

    [Fact]
    public void Resolve_HostileStdin_OneJsonObjectPerLineAndInvalidUtf8ReportedWithLineNumbers()
    {
        var run = CliHarness.Run(fixture.Embedder, ["resolve", "--registry", Registry, "--input", "-", "--json"], HostileInput());

        Assert.Equal(0, run.ExitCode);
        var objects = JsonLines(run.Out);
        Assert.Equal(14, objects.Count);
        foreach (var o in objects)
            Assert.Contains(o.GetProperty("outcome").GetString(), new[] { "accepted", "rejected", "ambiguous" });
        // Exactly the two lines with invalid UTF-8 are reported, by number; nothing else is on standard error.
        Assert.Equal(["stdin:2: warning", "stdin:3: warning"], run.ErrLines.Select(l => l[..l.IndexOf(": warning", StringComparison.Ordinal)] + ": warning"));
        Assert.False(run.HasStackTrace);
        // The replaced bytes are dropped by normalisation, so the phrases still match exactly.
        Assert.Equal("water-basil", objects[1].GetProperty("task").GetString());
        Assert.Equal("hall-light", objects[2].GetProperty("task").GetString());
        Assert.Equal("hall-light", objects[3].GetProperty("task").GetString());
        Assert.Equal("water-basil", objects[4].GetProperty("task").GetString());
        Assert.True(objects[6].GetProperty("truncated").GetBoolean());
        Assert.Equal("unintelligible", objects[7].GetProperty("reason").GetString());
        Assert.Equal("unintelligible", objects[11].GetProperty("reason").GetString());
        foreach (int i in new[] { 9, 10, 11, 12, 13 })
            Assert.NotEqual("accepted", objects[i].GetProperty("outcome").GetString());
    }

    [Fact]
    public void Resolve_InvalidUtf8InFile_ReportsThePathAndLine()
    {
        string path = Path.Combine(_dir, "utterances.txt");
        File.WriteAllBytes(path, [.. Encoding.UTF8.GetBytes("feed the fish\n\nwater the basil\n"), 0xC3, 0x28, (byte)'\n']);

        var run = CliHarness.Run(fixture.Embedder, ["resolve", "--registry", Registry, "--input", path, "--json"]);

        Assert.Equal(0, run.ExitCode);
        Assert.Equal(3, JsonLines(run.Out).Count); // the blank line 2 is skipped, line 4 is resolved with U+FFFD
        Assert.Single(run.ErrLines);
        Assert.StartsWith($"{path}:4: warning: invalid UTF-8", run.ErrLines[0], StringComparison.Ordinal);
    }

    [Fact]
    public void Resolve_LineOverTheReaderLimit_IsCutReportedAndResolved()
    {
        // 3,000,000 characters on one line (then a normal line, CR LF endings): bounded memory, a warning, both resolved.
        byte[] input = Join(Encoding.UTF8.GetBytes(new string('a', 3 * InputLines.MaxLineChars)), "\r\nwater the basil\r\n"u8.ToArray());

        var run = CliHarness.Run(fixture.Embedder, ["resolve", "--registry", Registry, "--input", "-", "--json"], input);

        Assert.Equal(0, run.ExitCode);
        var objects = JsonLines(run.Out);
        Assert.Equal(2, objects.Count);
        Assert.Equal(InputLines.MaxLineChars, objects[0].GetProperty("utterance").GetString()!.Length);
        Assert.True(objects[0].GetProperty("truncated").GetBoolean());
        Assert.Equal("water-basil", objects[1].GetProperty("task").GetString());
        Assert.StartsWith("stdin:1: warning: the line is longer than 1,000,000 characters", Assert.Single(run.ErrLines), StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("a\nb\n", "a|b")]
    [InlineData("a\r\nb", "a|b")]
    [InlineData("a\rb\r\n\r\nc", "a|b|c")]
    [InlineData("\n\n  \n", "")]
    public void Read_LineEndings_SplitLikeReadLine(string text, string expected)
    {
        // The reference is TextReader.ReadLine, which the reader replaced: same lines, blank ones skipped.
        var context = new CliContext { Out = new StringWriter(), Err = new StringWriter(), OpenStdin = () => new MemoryStream(Encoding.UTF8.GetBytes(text)) };
        var reference = new List<string>();
        using (var r = new StringReader(text)) while (r.ReadLine() is { } l) if (!string.IsNullOrWhiteSpace(l)) reference.Add(l);

        var got = InputLines.Read("-", context).Select(l => l.Text).ToList();

        Assert.Equal(reference, got);
        Assert.Equal(expected, string.Join('|', got));
    }

    [Fact]
    public void Resolve_HumanOutput_NeverEchoesControlCharacters()
    {
        var run = CliHarness.Run(fixture.Embedder, ["resolve", "--registry", Registry, "--input", "-"], HostileInput());

        Assert.Equal(0, run.ExitCode);
        // No ESC (ANSI sequences), NUL, bidi override or other control/format character reaches the terminal.
        Assert.DoesNotContain(run.Out, c => c != '\n' && c != '\r' && (char.IsControl(c) || char.GetUnicodeCategory(c) == System.Globalization.UnicodeCategory.Format));
        Assert.Contains("\\u001B[2J press the hall light switch", run.Out, StringComparison.Ordinal);
        // Console markup in an utterance is shown as text, not interpreted.
        Assert.Contains("[red]hazard[/]", run.Out, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("\u001B]0;owned\u0007", "\\u001B]0;owned\\u0007")]
    [InlineData("a\u202Eb", "a\\u202Eb")]
    [InlineData("emoji \U0001F642 stays", "emoji \U0001F642 stays")]
    public void Printable_ControlFormatAndBrokenCharacters_AreEscaped(string input, string expected)
        => Assert.Equal(expected, ResolveCommand.Printable(input));

    [Fact]
    public void Printable_LoneSurrogate_IsEscaped()
        => Assert.Equal("\\uD800x\\uDC00", ResolveCommand.Printable("\uD800x\uDC00")); // (attribute data cannot carry a lone surrogate)

    [Fact]
    public void Resolve_OptionLikeUtteranceAfterDoubleDash_IsResolved()
    {
        var run = CliHarness.Run(fixture.Embedder, ["resolve", "--registry", Registry, "--json", "--", "--water the basil"]);

        Assert.Equal(0, run.ExitCode);
        Assert.Equal("--water the basil", JsonLines(run.Out).Single().GetProperty("utterance").GetString());
    }
}
