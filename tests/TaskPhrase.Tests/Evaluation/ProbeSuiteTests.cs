using System.Globalization;
using CsCheck;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

public class ProbeSuiteTests
{
    private static string Fixture(string name) => Path.Combine(AppContext.BaseDirectory, "data", "probes", name);

    private static readonly string[] HarborStreetTasks =
    [
        "hall-light", "keys-hook", "mail-pickup", "water-basil", "page-turn", "phone-fetch",
        "pill-organizer", "kettle-pour", "window-latch", "remote-fetch", "blanket", "fish-food",
    ];

    [Fact]
    public void Load_HarborStreetSample_ReadsEveryRowWithLineKindAndNote()
    {
        var suite = ProbeSuite.Load(Fixture("harbor-street-sample.csv"));

        Assert.Equal(11, suite.Cases.Count);
        Assert.Equal(["source"], suite.IgnoredColumns);
        Assert.Equal(new ProbeCase("water the basil", "water-basil", "exact", "approved phrase", 2), suite.Cases[0]);
        // RFC 4180 section 2, rules 6 and 7: a quoted field may contain commas, and "" inside it is one quote.
        Assert.Equal("hang my keys up, please", suite.Cases[2].Utterance);
        Assert.Equal("speech recognition wrote \"paige\"", suite.Cases[3].Note);
        Assert.Null(suite.Cases[1].Note);
        Assert.Equal(" ", suite.Cases[10].Utterance);
        Assert.Equal(12, suite.Cases[10].Line);
        Assert.Equal(5, suite.Cases.Count(c => c.IsInScope));
        Assert.Empty(suite.Validate(HarborStreetTasks));
    }

    [Fact]
    public void Load_CrlfAndQuotedLineBreak_LinesCountPhysicalLines()
    {
        // RFC 4180 section 2, rule 6: a quoted field may contain line breaks; the row after it starts two lines later.
        var suite = ProbeSuite.Load(Fixture("crlf-multiline.csv"));

        Assert.Equal(["water the basil", "two\r\nlines", "fry me an egg"], suite.Cases.Select(c => c.Utterance));
        Assert.Equal([2, 4, 6], suite.Cases.Select(c => c.Line));
    }

    [Fact]
    public void Parse_ColumnsInAnyOrderAndCase_AreRecognised()
    {
        var suite = ProbeSuite.Parse(new StringReader("Note , EXPECT,Utterance\nmy note, reject ,fry me an egg\n"), "inline");

        Assert.Equal(new ProbeCase("fry me an egg", "reject", null, "my note", 2), Assert.Single(suite.Cases));
    }

    [Fact]
    public void Parse_ByteOrderMarkBeforeHeader_IsIgnored()
    {
        var suite = ProbeSuite.Parse(new StringReader("\uFEFFutterance,expect\nfry me an egg,reject\n"), "bom");
        Assert.Equal("fry me an egg", Assert.Single(suite.Cases).Utterance);
    }

    [Theory]
    [InlineData("empty-file.csv", 1, "the probe suite is empty; the first line must be a header row such as utterance,expect,kind,note.")]
    [InlineData("header-missing-expect.csv", 1, "the header has no 'expect' column (found columns utterance, expected, kind); did you mean 'expect' for the column 'expected'?")]
    [InlineData("header-duplicate-column.csv", 1, "column 'Kind' appears twice in the header (columns 3 and 4); rename or remove one.")]
    [InlineData("no-header-row.csv", 1, "the first line is not a header row with 'utterance' and 'expect' columns (found columns water the basil, water-basil); add a header row such as utterance,expect,kind,note as the first line.")]
    [InlineData("empty-utterance.csv", 3, "utterance is empty; write the test utterance (to probe empty input, write a quoted space \" \").")]
    [InlineData("empty-expect.csv", 3, "expect is empty; write the task id the utterance should resolve to, or reject.")]
    [InlineData("expect-not-kebab-case.csv", 2, "expect 'Water-Basil' is neither reject nor a task id; did you mean 'water-basil'?")]
    [InlineData("unterminated-quote.csv", 3, "a quoted field opens here and is never closed, so lines 3–4 were read as one field; add the closing quote (a quote inside a quoted field is written \"\").")]
    [InlineData("quote-in-unquoted-field.csv", 2, "the unquoted field say \"hello\" to the kettle contains a quote character; put the field in double quotes and double the quote inside it, e.g. \"say \"\"hello\"\"\".")]
    [InlineData("text-after-closing-quote.csv", 2, "text follows the closing quote of the field \"water\" the basil; quote the whole field and double the quotes inside it, e.g. \"say \"\"hello\"\" to the kettle\".")]
    [InlineData("too-many-fields.csv", 2, "row has 3 fields but the header has 2; put a field that contains a comma in double quotes, e.g. \"water the basil, please\".")]
    [InlineData("too-few-fields.csv", 3, "row has 2 fields but the header has 3; missing: kind. Add the missing field (an empty one is written as nothing between two commas).")]
    [InlineData("contradictory-duplicate.csv", 4, "the same utterance is on line 2 with expect 'water-basil', here with 'reject'; a probe has one expected result, so correct or remove one of the rows.")]
    [InlineData("not-utf8.csv", 3, "the file is not valid UTF-8 (byte offset 48); save the file as UTF-8.")]
    [InlineData("utf16.csv", 1, "the file is not valid UTF-8 (byte offset 0); it looks like UTF-16; save it as UTF-8.")]
    public void Load_BrokenFile_ReportsTheDefectWithItsLine(string file, int line, string message)
    {
        var ex = Assert.Throws<ProbeSuiteException>(() => ProbeSuite.Load(Fixture(file)));

        var error = Assert.Single(ex.Errors);
        Assert.Equal(Fixture(file), error.Source);
        Assert.Equal(line, error.Line);
        Assert.Equal(message, error.Message);
        Assert.Equal($"{Fixture(file)}:{line}: {message}", ex.Message);
    }

    [Fact]
    public void Load_SeveralBadRows_ListsEveryOneInFileOrder()
    {
        var ex = Assert.Throws<ProbeSuiteException>(() => ProbeSuite.Load(Fixture("several-bad-rows.csv")));

        Assert.Equal([3, 4, 5, 7], ex.Errors.Select(e => e.Line));
        Assert.StartsWith("utterance is empty", ex.Errors[0].Message);
        Assert.StartsWith("expect is empty", ex.Errors[1].Message);
        Assert.StartsWith("row has 4 fields but the header has 3", ex.Errors[2].Message);
        Assert.StartsWith("expect 'Page-Turn' is neither reject nor a task id; did you mean 'page-turn'?", ex.Errors[3].Message);
        Assert.StartsWith($"4 problems in probe suite {Fixture("several-bad-rows.csv")}:", ex.Message);
        foreach (var e in ex.Errors) Assert.Contains(e.ToString(), ex.Message);
    }

    [Fact]
    public void Load_MissingFile_SaysNotFound()
    {
        var ex = Assert.Throws<ProbeSuiteException>(() => ProbeSuite.Load(Fixture("no-such-file.csv")));
        Assert.StartsWith("file not found", Assert.Single(ex.Errors).Message);
        Assert.Equal(0, ex.Errors[0].Line);
    }

    [Fact]
    public void Parse_InputLongerThanLimit_IsRefused()
    {
        // Small limits stand in for the 64 Mi defaults; the endless reader would otherwise never stop.
        var limits = new ProbeSuite.ReadLimits(MaxChars: 10_000, MaxRows: 1_000_000, MaxFieldLength: 1000);
        var ex = Assert.Throws<ProbeSuiteException>(() => ProbeSuite.Parse(new EndlessReader(), "endless", limits));
        Assert.Equal("input is longer than 10000 characters, the limit for probe suites; split it into several suites.",
            Assert.Single(ex.Errors).Message);
    }

    [Fact]
    public void Parse_MoreRowsThanLimit_IsRefusedAtTheFirstRowOver()
    {
        var limits = new ProbeSuite.ReadLimits(MaxChars: 1_000_000, MaxRows: 3, MaxFieldLength: 1000);
        var ex = Assert.Throws<ProbeSuiteException>(() => ProbeSuite.Parse(new EndlessReader(), "endless", limits));
        var error = Assert.Single(ex.Errors);
        Assert.Equal(5, error.Line); // header on line 1, rows 1–3 on lines 2–4, the fourth row on line 5
        Assert.Equal("more than 3 rows, the limit for a probe suite; split it into several suites.", error.Message);
    }

    [Fact]
    public void Parse_FieldLongerThanLimit_IsRefusedWithLine()
    {
        var limits = new ProbeSuite.ReadLimits(MaxChars: 1_000_000, MaxRows: 100, MaxFieldLength: 1000);
        string text = "utterance,expect\nfry me an egg,reject\n\"" + new string('a', 2000);
        var ex = Assert.Throws<ProbeSuiteException>(() => ProbeSuite.Parse(new StringReader(text), "long", limits));
        Assert.Equal(3, Assert.Single(ex.Errors).Line);
        Assert.Equal("a field starting on or after this line is longer than 1000 characters (often an unclosed quote); close the quote or shorten the field.", ex.Errors[0].Message);
    }

    [Fact]
    public void Validate_UnknownTaskIds_NamesLineAndSuggestsClosest()
    {
        var suite = ProbeSuite.Load(Fixture("unknown-task.csv"));

        var errors = suite.Validate(HarborStreetTasks);

        Assert.Equal(2, errors.Count);
        Assert.Equal(new ProbeSuiteError(Fixture("unknown-task.csv"), 2, "expect 'water-basl' is not a task of the registry; did you mean 'water-basil'?"), errors[0]);
        Assert.Equal(new ProbeSuiteError(Fixture("unknown-task.csv"), 4, "expect 'dog-walk' is not a task of the registry; use one of the registry's task ids or reject"), errors[1]);
        Assert.Equal(2, Assert.Throws<ProbeSuiteException>(() => suite.EnsureValid(HarborStreetTasks)).Errors.Count);
    }

    [Fact]
    public void Write_ThenParse_RoundTripsAwkwardText()
    {
        ProbeCase[] cases =
        [
            new("water the basil", "water-basil", "exact"),
            new("hang my keys up, please", "keys-hook", null, "has a comma"),
            new("say \"hello\" to the kettle", ProbeCase.Reject, "out-of-scope", "has \"quotes\""),
            new("two\nlines", ProbeCase.Reject),
            new("  padded  ", ProbeCase.Reject, "empty"),
            new("=cmd|' /C calc'!A0", ProbeCase.Reject, "nonsense", "spreadsheet formula text stays verbatim"),
        ];
        var writer = new StringWriter();
        ProbeSuite.Write(writer, cases);

        var back = ProbeSuite.Parse(new StringReader(writer.ToString()), "written");

        Assert.StartsWith("utterance,expect,kind,note\n", writer.ToString());
        Assert.Contains("\"hang my keys up, please\",keys-hook,,has a comma\n", writer.ToString());
        Assert.Contains("\"say \"\"hello\"\" to the kettle\"", writer.ToString());
        Assert.Equal(cases.Select(c => c with { Line = 0 }), back.Cases.Select(c => c with { Line = 0 }));
    }

    [Fact]
    public void Write_NoKindsOrNotes_WritesTwoColumnsWithCrlfWhenAsked()
    {
        var writer = new StringWriter();
        ProbeSuite.Write(writer, [new ProbeCase("fry me an egg", ProbeCase.Reject)], "\r\n");
        Assert.Equal("utterance,expect\r\nfry me an egg,reject\r\n", writer.ToString());
    }

    [Fact]
    public void Write_ProbeThatWouldNotReadBack_Throws()
        => Assert.Throws<ArgumentException>(() => ProbeSuite.Write(new StringWriter(), [new ProbeCase("", "reject")]));

    [Fact]
    public void WriteParse_Property_RoundTripsArbitraryText()
    {
        var text = Gen.Char["abc ,\"\n\r\tédž'=-"].Array[1, 12].Select(chars => new string(chars));
        var probe = Gen.Select(text, Gen.OneOfConst("reject", "water-basil", "kettle-pour"), Gen.OneOfConst<string?>(null, "paraphrase"), text,
            (u, e, k, n) => new ProbeCase(u, e, k, n));
        probe.Array[1, 8].Sample(cases =>
        {
            // Distinct utterances only: contradictory duplicates are (correctly) refused by Parse.
            var distinct = cases.DistinctBy(c => TaskPhrase.Text.TextNormalizer.MatchKey(c.Utterance)).ToArray();
            var writer = new StringWriter(CultureInfo.InvariantCulture);
            ProbeSuite.Write(writer, distinct);
            var back = ProbeSuite.Parse(new StringReader(writer.ToString()), "property");
            Assert.Equal(distinct.Select(c => c.Utterance), back.Cases.Select(c => c.Utterance));
            Assert.Equal(distinct.Select(c => c.Expect), back.Cases.Select(c => c.Expect));
            Assert.Equal(distinct.Select(c => c.Kind), back.Cases.Select(c => c.Kind));
            Assert.Equal(distinct.Select(c => string.IsNullOrEmpty(c.Note) ? null : c.Note), back.Cases.Select(c => c.Note));
        }, iter: 300);
    }

    /// <summary>A reader that never ends (hand-written test double).</summary>
    private sealed class EndlessReader : TextReader
    {
        public override int Peek() => throw new NotSupportedException("the parser reads in blocks");
        public override int Read() => Next();
        public override int Read(char[] buffer, int index, int count)
        {
            // Valid CSV forever: a header, then "x,reject" rows.
            for (int i = 0; i < count; i++) buffer[index + i] = Next();
            return count;
        }
        public override int Read(Span<char> buffer)
        {
            for (int i = 0; i < buffer.Length; i++) buffer[i] = Next();
            return buffer.Length;
        }
        private const string Header = "utterance,expect\n";
        private const string Row = "x,reject\n";
        private long _position;
        private char Next() { long p = _position++; return p < Header.Length ? Header[(int)p] : Row[(int)((p - Header.Length) % Row.Length)]; }
    }
}
