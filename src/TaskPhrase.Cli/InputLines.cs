using System.Text;

namespace TaskPhrase.Cli;

/// <summary>
/// Reads utterances one per line from a file or standard input (<c>-</c>). Invalid UTF-8 is replaced by U+FFFD and
/// reported on standard error with its line number; nothing is dropped silently. Blank lines are skipped. A line
/// longer than <see cref="MaxLineChars"/> is cut there (and reported), so one huge line cannot exhaust memory.
/// </summary>
internal static class InputLines
{
    /// <summary>Longest line kept, in characters; far above the resolver's own cap (ResolverOptions.MaxInputChars).</summary>
    public const int MaxLineChars = 1_000_000;

    public static IEnumerable<(int Line, string Text)> Read(string path, CliContext context)
    {
        Stream stream;
        try
        {
            stream = path == "-" ? context.OpenStdin() : File.OpenRead(path);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new CliException($"{path}: cannot read input ({e.Message}).");
        }
        string name = path == "-" ? "stdin" : path;
        using (stream)
        {
            using var reader = new StreamReader(stream, new UTF8Encoding(false, false), detectEncodingFromByteOrderMarks: true);
            int line = 0;
            foreach (var (text, cut) in Lines(reader))
            {
                line++;
                if (text.Contains('\uFFFD'))
                    context.Err.WriteLine($"{name}:{line}: warning: invalid UTF-8 (or a literal U+FFFD) in the input; the bad bytes were replaced by U+FFFD.");
                if (cut)
                    context.Err.WriteLine($"{name}:{line}: warning: the line is longer than {MaxLineChars:N0} characters; only its first {MaxLineChars:N0} are used.");
                if (string.IsNullOrWhiteSpace(text)) continue;
                yield return (line, text);
            }
        }
    }

    /// <summary>Lines as <see cref="TextReader.ReadLine"/> splits them (LF, CR or CR LF), each cut at <see cref="MaxLineChars"/>.</summary>
    private static IEnumerable<(string Text, bool Cut)> Lines(TextReader reader)
    {
        var line = new StringBuilder();
        var buffer = new char[16 * 1024];
        bool cut = false, afterCr = false, pending = false;
        int read;
        while ((read = reader.Read(buffer, 0, buffer.Length)) > 0)
        {
            for (int i = 0; i < read; i++)
            {
                char c = buffer[i];
                if (afterCr)
                {
                    afterCr = false;
                    if (c == '\n') continue;
                }
                if (c is '\n' or '\r')
                {
                    afterCr = c == '\r';
                    yield return (line.ToString(), cut);
                    line.Clear();
                    cut = pending = false;
                    continue;
                }
                pending = true;
                if (line.Length < MaxLineChars) line.Append(c);
                else cut = true;
            }
        }
        if (pending) yield return (line.ToString(), cut);
    }
}
