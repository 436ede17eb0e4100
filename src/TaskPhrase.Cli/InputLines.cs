using System.Text;

namespace TaskPhrase.Cli;

/// <summary>
/// Reads utterances one per line from a file or standard input (<c>-</c>). Invalid UTF-8 is replaced by U+FFFD and
/// reported on standard error with its line number; nothing is dropped silently. Blank lines are skipped.
/// </summary>
internal static class InputLines
{
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
        using (stream)
        {
            using var reader = new StreamReader(stream, new UTF8Encoding(false, false), detectEncodingFromByteOrderMarks: true);
            int line = 0;
            while (reader.ReadLine() is { } text)
            {
                line++;
                if (text.Contains('\uFFFD'))
                    context.Err.WriteLine($"{(path == "-" ? "stdin" : path)}:{line}: warning: invalid UTF-8 (or a literal U+FFFD) in the input; the bad bytes were replaced by U+FFFD.");
                if (string.IsNullOrWhiteSpace(text)) continue;
                yield return (line, text);
            }
        }
    }
}
