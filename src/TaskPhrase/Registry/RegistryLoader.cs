using System.Globalization;
using System.Text;

namespace TaskPhrase.Registry;

/// <summary>
/// Reads and validates registry files (YAML, format version 1) into <see cref="TaskRegistry"/> instances.
/// Every error is reported with file, line and column, and all errors of a file are reported together.
/// </summary>
/// <remarks>
/// <para>Hostile input is refused early and with bounded memory (see <see cref="RegistryLoadOptions"/>): a file's
/// size is checked before it is opened, at most <see cref="RegistryLoadOptions.MaxFileBytes"/> + 1 bytes are ever
/// read, binary data (NUL and other control characters) and invalid UTF-8 are refused before YAML parsing,
/// and YAML anchors and aliases, tags, several documents, duplicate keys and deep nesting are refused while
/// parsing.</para>
/// <para>Phrases, titles and word lists are stored normalised with <see cref="Text.TextNormalizer.Normalize"/>
/// (case kept); duplicates are found with <see cref="Text.TextNormalizer.MatchKey"/>.</para>
/// <para>All members are static, pure apart from reading the file, and thread-safe.</para>
/// </remarks>
public static class RegistryLoader
{
    /// <summary>Loads and validates the registry file at <paramref name="path"/>.</summary>
    /// <param name="path">The registry file; diagnostics name it as given.</param>
    /// <param name="options">Limits; <see cref="RegistryLoadOptions.Default"/> when null.</param>
    /// <exception cref="ArgumentException"><paramref name="path"/> is null or empty.</exception>
    /// <exception cref="RegistryException">The file is missing, unreadable or invalid; carries every diagnostic.</exception>
    public static TaskRegistry Load(string path, RegistryLoadOptions? options = null)
        => Unwrap(TryLoad(path, options));

    /// <summary>Parses and validates registry YAML held in memory.</summary>
    /// <param name="yaml">The YAML text.</param>
    /// <param name="sourceName">Name used in diagnostics (e.g. a file name); also recorded as <see cref="TaskRegistry.SourcePath"/>.</param>
    /// <param name="options">Limits; <see cref="RegistryLoadOptions.Default"/> when null.</param>
    /// <exception cref="ArgumentNullException"><paramref name="yaml"/> or <paramref name="sourceName"/> is null.</exception>
    /// <exception cref="RegistryException">The text is invalid; carries every diagnostic.</exception>
    public static TaskRegistry Parse(string yaml, string sourceName, RegistryLoadOptions? options = null)
        => Unwrap(TryParse(yaml, sourceName, options));

    /// <summary>Like <see cref="Load"/>, but returns the diagnostics instead of throwing for an invalid file.</summary>
    /// <exception cref="ArgumentException"><paramref name="path"/> is null or empty.</exception>
    public static RegistryLoadResult TryLoad(string path, RegistryLoadOptions? options = null)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        options ??= RegistryLoadOptions.Default;
        var bag = new DiagnosticBag(path);
        byte[]? bytes = ReadBounded(path, options.MaxFileBytes, bag);
        if (bytes is null) return Result(null, bag);
        string? text = DecodeUtf8(bytes, bag);
        if (text is null) return Result(null, bag);
        return Result(ParseYamlCore(text, bag, options, path), bag);
    }

    /// <summary>Like <see cref="Parse"/>, but returns the diagnostics instead of throwing for invalid text.</summary>
    /// <exception cref="ArgumentNullException"><paramref name="yaml"/> or <paramref name="sourceName"/> is null.</exception>
    public static RegistryLoadResult TryParse(string yaml, string sourceName, RegistryLoadOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(yaml);
        ArgumentNullException.ThrowIfNull(sourceName);
        options ??= RegistryLoadOptions.Default;
        var bag = new DiagnosticBag(sourceName);
        // Each char takes at least one UTF-8 byte, so the length alone refuses most oversized text without a scan.
        if (yaml.Length > options.MaxFileBytes || Encoding.UTF8.GetByteCount(yaml) > options.MaxFileBytes)
        {
            bag.Error(RegistryDiagnosticCodes.FileTooLarge, SourcePosition.None,
                $"the registry text is larger than {options.MaxFileBytes:N0} bytes (RegistryLoadOptions.MaxFileBytes); a registry is a small text file: check the input or raise the limit.");
            return Result(null, bag);
        }
        if (yaml.Length > 0 && yaml[0] == '\uFEFF') yaml = yaml[1..];
        if (!CheckChars(yaml, bag)) return Result(null, bag);
        return Result(ParseYamlCore(yaml, bag, options, sourceName), bag);
    }

    internal static TaskRegistry? ParseYamlCore(string text, DiagnosticBag bag, RegistryLoadOptions options, string? sourcePath)
    {
        var root = YamlTreeReader.Read(text, options, bag, out bool fatal);
        return fatal ? null : Build(root, bag, options, sourcePath);
    }

    internal static TaskRegistry? ParseJsonCore(byte[] utf8, DiagnosticBag bag, RegistryLoadOptions options, string? sourcePath)
    {
        if (utf8.LongLength > options.MaxFileBytes)
        {
            bag.Error(RegistryDiagnosticCodes.FileTooLarge, SourcePosition.None,
                $"the canonical JSON is larger than {options.MaxFileBytes:N0} bytes.");
            return null;
        }
        var root = JsonTreeReader.Read(utf8, options, bag, out bool fatal);
        return fatal ? null : Build(root, bag, options, sourcePath);
    }

    private static TaskRegistry? Build(RegistryNode? root, DiagnosticBag bag, RegistryLoadOptions options, string? sourcePath)
    {
        var parts = RegistryValidator.Validate(root, options, bag);
        if (parts is null || bag.HasErrors) return null;
        string json = RegistryCanonicalForm.ToJson(parts.Tasks, parts.Defaults, parts.ModelId, parts.Settings);
        return new TaskRegistry(parts.Tasks, parts.Defaults, RegistryCanonicalForm.HashOf(json), parts.ModelId, sourcePath, parts.Settings);
    }

    /// <summary>Reads the whole file only when its size is within the limit, and never more than limit + 1 bytes.</summary>
    private static byte[]? ReadBounded(string path, long maxBytes, DiagnosticBag bag)
    {
        try
        {
            if (Directory.Exists(path))
            {
                bag.Error(RegistryDiagnosticCodes.FileUnreadable, SourcePosition.None,
                    "this is a directory, not a registry file; give the path of the .yaml file.");
                return null;
            }
            var info = new FileInfo(path);
            if (!info.Exists)
            {
                bag.Error(RegistryDiagnosticCodes.FileNotFound, SourcePosition.None,
                    $"the registry file does not exist; check the path (relative paths start at {Environment.CurrentDirectory}).");
                return null;
            }
            if (info.Length > maxBytes)
            {
                bag.Error(RegistryDiagnosticCodes.FileTooLarge, SourcePosition.None, TooLarge(info.Length, maxBytes));
                return null;
            }
            using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, bufferSize: 1, FileOptions.SequentialScan);
            // The file may have grown since the size check: read at most one byte past the limit.
            var buffer = new byte[Math.Min(info.Length, maxBytes) + 1];
            int total = 0;
            while (total < buffer.Length)
            {
                int read = stream.Read(buffer, total, buffer.Length - total);
                if (read == 0) break;
                total += read;
            }
            if (total > maxBytes)
            {
                bag.Error(RegistryDiagnosticCodes.FileTooLarge, SourcePosition.None, TooLarge(total, maxBytes));
                return null;
            }
            return total == buffer.Length ? buffer : buffer[..total];
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or ArgumentException or NotSupportedException)
        {
            bag.Error(RegistryDiagnosticCodes.FileUnreadable, SourcePosition.None,
                $"the registry file cannot be read ({ex.Message}); check that it exists and that you may read it.");
            return null;
        }
    }

    private static string TooLarge(long size, long maxBytes)
        => string.Create(CultureInfo.InvariantCulture,
            $"the file is {size:N0} bytes or more, over the limit of {maxBytes:N0} bytes (RegistryLoadOptions.MaxFileBytes); a registry is a small text file: check that this is the right file or raise the limit.");

    /// <summary>
    /// Decodes strict UTF-8 (a leading BOM is dropped), refusing invalid sequences, UTF-16 files and control
    /// characters, with the line and column of the first offending byte. One pass; stops at the first problem.
    /// </summary>
    private static string? DecodeUtf8(byte[] bytes, DiagnosticBag bag)
    {
        ReadOnlySpan<byte> span = bytes;
        if (span.Length >= 2 && ((span[0] == 0xFF && span[1] == 0xFE) || (span[0] == 0xFE && span[1] == 0xFF)))
        {
            bag.Error(RegistryDiagnosticCodes.NotUtf8, new SourcePosition(1, 1),
                "the file is UTF-16 encoded; save it as UTF-8 text.");
            return null;
        }
        if (span.StartsWith((ReadOnlySpan<byte>)[0xEF, 0xBB, 0xBF])) span = span[3..];

        var tracker = new LineTracker();
        int offset = 0;
        while (offset < span.Length)
        {
            var status = System.Buffers.OperationStatus.Done;
            Rune rune;
            int consumed;
            byte b = span[offset];
            if (b < 0x80)
            {
                rune = new Rune(b);
                consumed = 1;
            }
            else
            {
                status = Rune.DecodeFromUtf8(span[offset..], out rune, out consumed);
            }
            if (status != System.Buffers.OperationStatus.Done)
            {
                bag.Error(RegistryDiagnosticCodes.NotUtf8, tracker.Position,
                    $"the byte 0x{span[offset]:X2} here is not valid UTF-8: the file is binary or in another encoding; save it as UTF-8 text (or check that this is the right file).");
                return null;
            }
            if (IsForbidden(rune.Value))
            {
                bag.Error(RegistryDiagnosticCodes.BinaryContent, tracker.Position, ForbiddenMessage(rune.Value));
                return null;
            }
            tracker.Advance(rune.Value, offset + consumed < span.Length ? span[offset + consumed] : -1, rune.Utf16SequenceLength);
            offset += consumed;
        }
        return Encoding.UTF8.GetString(span);
    }

    /// <summary>Refuses control characters and broken surrogate pairs in text given as a string.</summary>
    private static bool CheckChars(string text, DiagnosticBag bag)
    {
        var tracker = new LineTracker();
        for (int i = 0; i < text.Length; i++)
        {
            char c = text[i];
            if (char.IsSurrogate(c))
            {
                if (char.IsHighSurrogate(c) && i + 1 < text.Length && char.IsLowSurrogate(text[i + 1]))
                {
                    tracker.Advance('x', -1, 2);
                    i++;
                    continue;
                }
                bag.Error(RegistryDiagnosticCodes.NotUtf8, tracker.Position,
                    $"the text holds a broken surrogate (U+{(int)c:X4}) here, which UTF-8 cannot encode; fix the text's encoding.");
                return false;
            }
            if (IsForbidden(c))
            {
                bag.Error(RegistryDiagnosticCodes.BinaryContent, tracker.Position, ForbiddenMessage(c));
                return false;
            }
            tracker.Advance(c, i + 1 < text.Length ? text[i + 1] : -1, 1);
        }
        return true;
    }

    /// <summary>Control characters other than tab, line feed, carriage return and next-line (which YAML allows).</summary>
    private static bool IsForbidden(int codePoint)
        => codePoint is < 0x20 and not ('\t' or '\n' or '\r') || codePoint is 0x7F || codePoint is >= 0x80 and <= 0x9F and not 0x85;

    private static string ForbiddenMessage(int codePoint) => codePoint == 0
        ? "the file holds a NUL byte here: it is binary data, not a registry; check that this is the right file (a registry is UTF-8 text)."
        : $"the file holds the control character U+{codePoint:X4} here: a registry is plain UTF-8 text; remove the character or check that this is the right file.";

    private static TaskRegistry Unwrap(RegistryLoadResult result)
        => result.Registry ?? throw new RegistryException(result.Diagnostics);

    private static RegistryLoadResult Result(TaskRegistry? registry, DiagnosticBag bag)
        => new(bag.HasErrors ? null : registry, bag.ToList());

    /// <summary>Line and column (in UTF-16 chars, 1-based) of the next character; CR LF and lone CR count as one break.</summary>
    private struct LineTracker()
    {
        private int _line = 1, _column = 1;
        private bool _skipLf;

        public readonly SourcePosition Position => new(_line, _column);

        public void Advance(int codePoint, int next, int width)
        {
            if (_skipLf)
            {
                _skipLf = false;
                if (codePoint == '\n') return;
            }
            if (codePoint == '\n' || codePoint == '\r' || codePoint == 0x85)
            {
                _line++;
                _column = 1;
                _skipLf = codePoint == '\r' && next == '\n';
                return;
            }
            _column += width;
        }
    }
}
