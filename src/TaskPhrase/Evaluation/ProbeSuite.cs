using System.Buffers;
using System.Globalization;
using System.Text.RegularExpressions;
using CsvHelper;
using CsvHelper.Configuration;
using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Evaluation;

/// <summary>
/// A probe suite: test utterances with the expected task id or <c>reject</c>, read from CSV (RFC 4180, UTF-8).
/// Immutable; an instance that exists was read without errors. Create one with <see cref="Load"/> or <see cref="Parse(TextReader, string)"/>.
/// </summary>
/// <remarks>
/// <para>Format: a header row is required and must name the columns <c>utterance</c> and <c>expect</c> (any order,
/// any case, surrounding spaces ignored). The conventional columns <c>kind</c> and <c>note</c> fill
/// <see cref="ProbeCase.Kind"/> and <see cref="ProbeCase.Note"/>; any other column is allowed and listed in
/// <see cref="IgnoredColumns"/>. Fields may be quoted with <c>"</c>; a quote inside a quoted field is written
/// <c>""</c>; quoted fields may span lines. Lines with no characters at all are skipped.</para>
/// <para>Per row: <c>expect</c>, <c>kind</c> are trimmed; <c>utterance</c> and <c>note</c> are kept verbatim. A row is
/// bad when a field is missing or extra, the utterance is empty (zero characters — to probe empty input write a
/// quoted space <c>" "</c>), <c>expect</c> is empty or is neither <c>reject</c> nor a kebab-case task id, a quote is
/// malformed, or the same utterance (compared as for exact matching: normalised, case and edge punctuation ignored) appears earlier with a different <c>expect</c>. Bad rows are
/// never dropped: reading fails with a <see cref="ProbeSuiteException"/> that lists every one with its line.</para>
/// <para>Bounds: at most <see cref="MaxChars"/> characters (and <see cref="MaxBytes"/> bytes for files),
/// <see cref="MaxRows"/> rows and <see cref="MaxFieldLength"/> characters per field. Thread-safe (immutable).</para>
/// </remarks>
public sealed partial class ProbeSuite
{
    /// <summary>Largest probe suite file accepted, in bytes (64 MiB).</summary>
    public const long MaxBytes = 64L * 1024 * 1024;

    /// <summary>Largest probe suite accepted from a reader, in characters (64 Mi).</summary>
    public const long MaxChars = 64L * 1024 * 1024;

    /// <summary>Most probe rows accepted (one million).</summary>
    public const int MaxRows = 1_000_000;

    /// <summary>Longest field accepted, in characters (1 Mi).</summary>
    public const int MaxFieldLength = 1024 * 1024;

    /// <summary>Most errors collected before reading stops.</summary>
    public const int MaxErrors = 1000;

    private const string UtteranceColumn = "utterance";
    private const string ExpectColumn = "expect";
    private const string KindColumn = "kind";
    private const string NoteColumn = "note";

    private ProbeSuite(string sourceName, IReadOnlyList<ProbeCase> cases, IReadOnlyList<string> columns, IReadOnlyList<string> ignored)
    {
        SourceName = sourceName;
        Cases = cases;
        Columns = columns;
        IgnoredColumns = ignored;
    }

    /// <summary>The file path or source name the suite was read from (used in error messages and reports).</summary>
    public string SourceName { get; }

    /// <summary>The probes in file order, each with the line its row starts on.</summary>
    public IReadOnlyList<ProbeCase> Cases { get; }

    /// <summary>The header's column names as written (trimmed).</summary>
    public IReadOnlyList<string> Columns { get; }

    /// <summary>Header columns other than <c>utterance</c>, <c>expect</c>, <c>kind</c> and <c>note</c>; their values are not used.</summary>
    public IReadOnlyList<string> IgnoredColumns { get; }

    /// <summary>
    /// Reads a probe suite file (UTF-8, with or without a byte-order mark).
    /// </summary>
    /// <param name="path">The CSV file.</param>
    /// <returns>The suite; <see cref="SourceName"/> is <paramref name="path"/>.</returns>
    /// <exception cref="ProbeSuiteException">The file is missing, unreadable, too large, not UTF-8, or has bad rows (all listed).</exception>
    public static ProbeSuite Load(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        byte[] bytes;
        try
        {
            var info = new FileInfo(path);
            if (!info.Exists)
                throw Fail(path, 0, $"file not found (looked in {Path.GetFullPath(path)}); check the path.");
            if (info.Length > MaxBytes)
                throw Fail(path, 0, $"file is {info.Length} bytes, more than the {MaxBytes}-byte limit for probe suites; split it into several suites.");
            bytes = File.ReadAllBytes(path);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new ProbeSuiteException([new ProbeSuiteError(path, 0, $"cannot read the file ({e.Message}); check that it exists and is readable.")], e);
        }
        return Parse(new StringReader(DecodeUtf8(bytes, path)), path);
    }

    /// <summary>Reads a probe suite from CSV text.</summary>
    /// <param name="reader">The CSV text; not disposed.</param>
    /// <param name="sourceName">Name used in errors and reports, e.g. the file name.</param>
    /// <returns>The suite.</returns>
    /// <exception cref="ProbeSuiteException">The header is missing or incomplete, the input is too large, or rows are bad (all listed).</exception>
    public static ProbeSuite Parse(TextReader reader, string sourceName)
        => Parse(reader, sourceName, new ReadLimits(MaxChars, MaxRows, MaxFieldLength));

    /// <summary>Size limits of one read (the public constants, or smaller ones in tests).</summary>
    internal readonly record struct ReadLimits(long MaxChars, int MaxRows, int MaxFieldLength);

    internal static ProbeSuite Parse(TextReader reader, string sourceName, ReadLimits limits)
    {
        ArgumentNullException.ThrowIfNull(reader);
        ArgumentException.ThrowIfNullOrEmpty(sourceName);
        try
        {
            return ParseCore(new LimitedTextReader(reader, limits.MaxChars), sourceName, limits);
        }
        catch (LimitedTextReader.LimitExceededException)
        {
            throw Fail(sourceName, 0, $"input is longer than {limits.MaxChars} characters, the limit for probe suites; split it into several suites.");
        }
    }

    /// <summary>
    /// Checks every <c>expect</c> against the task ids of a registry.
    /// </summary>
    /// <param name="taskIds">The registry's task ids.</param>
    /// <returns>One error per row whose <c>expect</c> names an unknown task (with a did-you-mean when one is close); empty when all are known.</returns>
    public IReadOnlyList<ProbeSuiteError> Validate(IReadOnlyCollection<string> taskIds)
    {
        ArgumentNullException.ThrowIfNull(taskIds);
        var known = taskIds as IReadOnlySet<string> ?? new HashSet<string>(taskIds, StringComparer.Ordinal);
        var errors = new List<ProbeSuiteError>();
        foreach (var probe in Cases)
        {
            if (!probe.IsInScope || known.Contains(probe.Expect)) continue;
            string? suggestion = EditDistance.Suggest(probe.Expect, taskIds.Order(StringComparer.Ordinal));
            string hint = suggestion is null
                ? "use one of the registry's task ids or reject"
                : $"did you mean '{suggestion}'?";
            errors.Add(new ProbeSuiteError(SourceName, probe.Line, $"expect '{probe.Expect}' is not a task of the registry; {hint}"));
        }
        return errors;
    }

    /// <summary>Like <see cref="Validate"/>, but throws when any <c>expect</c> names an unknown task.</summary>
    /// <param name="taskIds">The registry's task ids.</param>
    /// <exception cref="ProbeSuiteException">Some <c>expect</c> values are unknown (all listed).</exception>
    public void EnsureValid(IReadOnlyCollection<string> taskIds)
    {
        var errors = Validate(taskIds);
        if (errors.Count > 0) throw new ProbeSuiteException(errors);
    }

    /// <summary>
    /// Writes probes as a CSV probe suite that <see cref="Parse(TextReader, string)"/> reads back unchanged: a header row, then one row per
    /// probe. Columns <c>utterance,expect</c>, plus <c>kind</c> and <c>note</c> when any probe has one. A field is quoted
    /// (RFC 4180, inner quotes doubled) when it contains a comma, quote, line break, or leading or trailing white space.
    /// </summary>
    /// <param name="writer">Destination; not disposed, flushed at the end.</param>
    /// <param name="cases">The probes.</param>
    /// <param name="newLine">Record separator: <c>"\n"</c> (default, the repository convention) or <c>"\r\n"</c> (RFC 4180's CRLF).</param>
    /// <exception cref="ArgumentException">A probe would not read back (empty utterance, or an expect that is neither reject nor kebab-case), or <paramref name="newLine"/> is neither.</exception>
    public static void Write(TextWriter writer, IEnumerable<ProbeCase> cases, string newLine = "\n")
    {
        ArgumentNullException.ThrowIfNull(writer);
        ArgumentNullException.ThrowIfNull(cases);
        if (newLine is not ("\n" or "\r\n"))
            throw new ArgumentException("newLine must be \"\\n\" or \"\\r\\n\".", nameof(newLine));
        var list = cases.ToList();
        foreach (var probe in list)
        {
            if (probe.Utterance.Length == 0 || !IsValidExpect(probe.Expect))
                throw new ArgumentException($"Probe '{probe.Utterance}' → '{probe.Expect}' would not read back: the utterance must not be empty and expect must be reject or a kebab-case task id.", nameof(cases));
        }
        bool withKind = list.Any(p => !string.IsNullOrEmpty(p.Kind));
        bool withNote = list.Any(p => !string.IsNullOrEmpty(p.Note));
        var config = new CsvConfiguration(CultureInfo.InvariantCulture)
        {
            NewLine = newLine,
            ShouldQuote = args => args.Field is { Length: > 0 } f
                && (f.AsSpan().IndexOfAny(",\"\r\n") >= 0 || char.IsWhiteSpace(f[0]) || char.IsWhiteSpace(f[^1])),
            InjectionOptions = InjectionOptions.None,
        };
        using var csv = new CsvWriter(writer, config, leaveOpen: true);
        csv.WriteField(UtteranceColumn);
        csv.WriteField(ExpectColumn);
        if (withKind) csv.WriteField(KindColumn);
        if (withNote) csv.WriteField(NoteColumn);
        csv.NextRecord();
        foreach (var probe in list)
        {
            csv.WriteField(probe.Utterance);
            csv.WriteField(probe.Expect);
            if (withKind) csv.WriteField(probe.Kind ?? "");
            if (withNote) csv.WriteField(probe.Note ?? "");
            csv.NextRecord();
        }
        csv.Flush();
        writer.Flush();
    }

    private static ProbeSuite ParseCore(TextReader reader, string source, ReadLimits limits)
    {
        var badData = new List<string>();
        var config = new CsvConfiguration(CultureInfo.InvariantCulture)
        {
            Mode = CsvMode.RFC4180,
            IgnoreBlankLines = false, // handled here so that line numbers can be counted from the raw records
            DetectColumnCountChanges = false,
            MaxFieldSize = limits.MaxFieldLength,
            BadDataFound = args => badData.Add(args.Field),
        };
        using var parser = new CsvParser(reader, config, leaveOpen: true);

        var errors = new List<ProbeSuiteError>();
        var cases = new List<ProbeCase>();
        int nextLine = 1; // line on which the next record starts
        int rows = 0;
        string[]? header = null;
        int utteranceIndex = -1, expectIndex = -1, kindIndex = -1, noteIndex = -1;
        var ignored = new List<string>();
        var seen = new Dictionary<string, (string Expect, int Line)>(StringComparer.Ordinal);

        while (true)
        {
            badData.Clear();
            bool read;
            try
            {
                read = parser.Read();
            }
            catch (MaxFieldSizeException)
            {
                errors.Add(new ProbeSuiteError(source, nextLine, $"a field starting on or after this line is longer than {limits.MaxFieldLength} characters (often an unclosed quote); close the quote or shorten the field."));
                break;
            }
            if (!read) break;

            string raw = parser.RawRecord;
            int line = nextLine;
            nextLine += CountLineBreaks(raw);
            string[] fields = parser.Record ?? [];
            if (fields.Length == 1 && fields[0].Length == 0 && badData.Count == 0 && IsOnlyLineBreak(raw)) continue; // blank line

            if (header is null)
            {
                if (line == 1 && fields.Length > 0) fields[0] = fields[0].TrimStart('\uFEFF');
                header = fields.Select(f => f.Trim()).ToArray();
                var headerErrors = ReadHeader(header, source, line, out utteranceIndex, out expectIndex, out kindIndex, out noteIndex, ignored);
                if (badData.Count > 0) headerErrors.Insert(0, new ProbeSuiteError(source, line, $"the header row has a malformed quote; {DescribeBadQuote(badData[0], line, nextLine - 1)}"));
                if (headerErrors.Count > 0) throw new ProbeSuiteException(headerErrors);
                continue;
            }

            if (++rows > limits.MaxRows)
            {
                errors.Add(new ProbeSuiteError(source, line, $"more than {limits.MaxRows} rows, the limit for a probe suite; split it into several suites."));
                break;
            }

            int before = errors.Count;
            if (badData.Count > 0)
                errors.Add(new ProbeSuiteError(source, line, DescribeBadQuote(badData[0], line, nextLine - 1)));
            else if (fields.Length < header.Length)
            {
                var missing = header.Skip(fields.Length).Select(h => h.Length == 0 ? "(unnamed)" : h);
                errors.Add(new ProbeSuiteError(source, line, $"row has {fields.Length} field{(fields.Length == 1 ? "" : "s")} but the header has {header.Length}; missing: {string.Join(", ", missing)}. Add the missing field{(header.Length - fields.Length == 1 ? "" : "s")} (an empty one is written as nothing between two commas)."));
            }
            else if (fields.Length > header.Length)
                errors.Add(new ProbeSuiteError(source, line, $"row has {fields.Length} fields but the header has {header.Length}; put a field that contains a comma in double quotes, e.g. \"water the basil, please\"."));

            if (errors.Count == before)
            {
                string utterance = fields[utteranceIndex];
                string expect = fields[expectIndex].Trim();
                string? kind = kindIndex >= 0 ? NullIfEmpty(fields[kindIndex].Trim()) : null;
                string? note = noteIndex >= 0 ? NullIfEmpty(fields[noteIndex]) : null;
                if (utterance.Length == 0)
                    errors.Add(new ProbeSuiteError(source, line, "utterance is empty; write the test utterance (to probe empty input, write a quoted space \" \")."));
                if (expect.Length == 0)
                    errors.Add(new ProbeSuiteError(source, line, "expect is empty; write the task id the utterance should resolve to, or reject."));
                else if (!IsValidExpect(expect))
                    errors.Add(new ProbeSuiteError(source, line, DescribeBadExpect(expect)));

                if (errors.Count == before)
                {
                    string key = TextNormalizer.MatchKey(utterance);
                    if (seen.TryGetValue(key, out var earlier) && !string.Equals(earlier.Expect, expect, StringComparison.Ordinal))
                        errors.Add(new ProbeSuiteError(source, line, $"the same utterance is on line {earlier.Line} with expect '{earlier.Expect}', here with '{expect}'; a probe has one expected result, so correct or remove one of the rows."));
                    else
                    {
                        seen.TryAdd(key, (expect, line));
                        cases.Add(new ProbeCase(utterance, expect, kind, note, line));
                    }
                }
            }

            if (errors.Count >= MaxErrors)
            {
                errors.Add(new ProbeSuiteError(source, line, $"stopped reading after {MaxErrors} errors; fix these first."));
                break;
            }
        }

        if (header is null)
            errors.Insert(0, new ProbeSuiteError(source, 1, "the probe suite is empty; the first line must be a header row such as utterance,expect,kind,note."));
        if (errors.Count > 0) throw new ProbeSuiteException(errors);
        return new ProbeSuite(source, cases, header!, ignored);
    }

    private static List<ProbeSuiteError> ReadHeader(string[] header, string source, int line,
        out int utterance, out int expect, out int kind, out int note, List<string> ignored)
    {
        var errors = new List<ProbeSuiteError>();
        utterance = expect = kind = note = -1;
        var firstIndex = new Dictionary<string, int>(StringComparer.OrdinalIgnoreCase);
        for (int i = 0; i < header.Length; i++)
        {
            string name = header[i];
            if (name.Length > 0 && !firstIndex.TryAdd(name, i))
            {
                errors.Add(new ProbeSuiteError(source, line, $"column '{name}' appears twice in the header (columns {firstIndex[name] + 1} and {i + 1}); rename or remove one."));
                continue;
            }
            switch (name.ToLowerInvariant())
            {
                case UtteranceColumn: utterance = i; break;
                case ExpectColumn: expect = i; break;
                case KindColumn: kind = i; break;
                case NoteColumn: note = i; break;
                default: if (name.Length > 0) ignored.Add(name); break;
            }
        }
        string found = "columns " + string.Join(", ", header.Select(h => h.Length == 0 ? "(unnamed)" : h));
        if (utterance < 0 && expect < 0)
        {
            errors.Add(new ProbeSuiteError(source, line, $"the first line is not a header row with 'utterance' and 'expect' columns (found {found}); add a header row such as utterance,expect,kind,note as the first line."));
            return errors;
        }
        string[] known = [UtteranceColumn, ExpectColumn, KindColumn, NoteColumn];
        foreach (var (required, index) in new[] { (UtteranceColumn, utterance), (ExpectColumn, expect) })
        {
            if (index >= 0) continue;
            string? near = header.FirstOrDefault(h => h.Length > 0 && !known.Contains(h, StringComparer.OrdinalIgnoreCase)
                && EditDistance.Suggest(h, [required]) is not null);
            string hint = near is not null
                ? $"did you mean '{required}' for the column '{near}'?"
                : $"add a '{required}' column";
            errors.Add(new ProbeSuiteError(source, line, $"the header has no '{required}' column (found {found}); {hint}"));
        }
        return errors;
    }

    private static string DescribeBadQuote(string field, int startLine, int endLine)
    {
        string shown = field.Length > 40 ? field[..40].ReplaceLineEndings(" ") + "…" : field.ReplaceLineEndings(" ");
        int quotes = field.Count(c => c == '"');
        if (field.StartsWith('"') && quotes % 2 == 1)
        {
            string extent = endLine > startLine ? $"lines {startLine}–{endLine}" : $"line {startLine}";
            return $"a quoted field opens here and is never closed, so {extent} were read as one field; add the closing quote (a quote inside a quoted field is written \"\").";
        }
        if (field.StartsWith('"'))
            return $"text follows the closing quote of the field {shown}; quote the whole field and double the quotes inside it, e.g. \"say \"\"hello\"\" to the kettle\".";
        return $"the unquoted field {shown} contains a quote character; put the field in double quotes and double the quote inside it, e.g. \"say \"\"hello\"\"\".";
    }

    private static string DescribeBadExpect(string expect)
    {
        if (string.Equals(expect, ProbeCase.Reject, StringComparison.OrdinalIgnoreCase))
            return $"expect '{expect}' must be written in lower case: reject.";
        string lowered = expect.Trim().ToLowerInvariant().Replace(' ', '-').Replace('_', '-');
        string hint = IsValidExpect(lowered) ? $"did you mean '{lowered}'?" : "task ids are lower-case kebab-case, e.g. water-basil.";
        return $"expect '{expect}' is neither reject nor a task id; {hint}";
    }

    private static bool IsValidExpect(string expect)
        => expect == ProbeCase.Reject || TaskIdPattern().IsMatch(expect);

    [GeneratedRegex("^[a-z0-9]+(?:-[a-z0-9]+)*$", RegexOptions.CultureInvariant)]
    private static partial Regex TaskIdPattern();

    private static string? NullIfEmpty(string value) => value.Length == 0 ? null : value;

    /// <summary>Number of line breaks (CRLF, CR or LF each count once) in a raw record.</summary>
    private static int CountLineBreaks(string raw)
    {
        int count = 0;
        for (int i = 0; i < raw.Length; i++)
        {
            if (raw[i] == '\n') count++;
            else if (raw[i] == '\r')
            {
                count++;
                if (i + 1 < raw.Length && raw[i + 1] == '\n') i++;
            }
        }
        return count;
    }

    private static bool IsOnlyLineBreak(string raw) => raw is "\n" or "\r\n" or "\r" or "";

    private static string DecodeUtf8(byte[] bytes, string path)
    {
        ReadOnlySpan<byte> span = bytes;
        if (span.StartsWith((ReadOnlySpan<byte>)[0xEF, 0xBB, 0xBF])) span = span[3..];
        var chars = new char[span.Length];
        var status = System.Text.Unicode.Utf8.ToUtf16(span, chars, out int bytesRead, out int charsWritten, replaceInvalidSequences: false);
        if (status != OperationStatus.Done)
        {
            int line = 1 + span[..bytesRead].Count((byte)'\n');
            string hint = bytes.Length >= 2 && ((bytes[0] == 0xFF && bytes[1] == 0xFE) || (bytes[0] == 0xFE && bytes[1] == 0xFF))
                ? "it looks like UTF-16; save it as UTF-8"
                : "save the file as UTF-8";
            throw Fail(path, line, $"the file is not valid UTF-8 (byte offset {bytesRead + (bytes.Length - span.Length)}); {hint}.");
        }
        return new string(chars, 0, charsWritten);
    }

    private static ProbeSuiteException Fail(string source, int line, string message)
        => new([new ProbeSuiteError(source, line, message)]);
}
