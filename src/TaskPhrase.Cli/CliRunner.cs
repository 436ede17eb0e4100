using System.CommandLine;
using System.Text.Json;

namespace TaskPhrase.Cli;

/// <summary>Runs a command body and maps failures to one-line messages and the documented exit codes.</summary>
internal static class CliRunner
{
    public static int Run(CliContext context, ParseResult parse, Func<int> body)
    {
        bool verbose = parse.GetValue<bool>("--verbose");
        try
        {
            return body();
        }
        catch (CliException e)
        {
            context.Err.WriteLine($"error: {e.Message}");
            if (verbose) context.Err.WriteLine(e.InnerException ?? e);
            return e.ExitCode;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or InvalidDataException or JsonException or FormatException or ArgumentException)
        {
            // An argument error names the library's parameter ("(Parameter 'layers')"), which means nothing on the command line.
            string message = e is ArgumentException { ParamName: { } name } ? e.Message.Replace($" (Parameter '{name}')", "", StringComparison.Ordinal) : e.Message;
            context.Err.WriteLine($"error: {message}");
            if (verbose) context.Err.WriteLine(e);
            return ExitCodes.BadInput;
        }
        catch (OperationCanceledException)
        {
            context.Err.WriteLine("cancelled.");
            return 130;
        }
    }

    /// <summary>A stream that writes UTF-8 JSON to the context's standard output writer.</summary>
    public static Stream StdoutStream(CliContext context) => new WriterStream(context.Out);

    /// <summary>Ends a JSON document with a newline.</summary>
    public static void EndJson(CliContext context) => context.Out.WriteLine();

    private sealed class WriterStream(TextWriter writer) : Stream
    {
        private readonly System.Text.Decoder _decoder = System.Text.Encoding.UTF8.GetDecoder();
        public override bool CanRead => false;
        public override bool CanSeek => false;
        public override bool CanWrite => true;
        public override long Length => throw new NotSupportedException();
        public override long Position { get => throw new NotSupportedException(); set => throw new NotSupportedException(); }
        public override void Flush() => writer.Flush();
        public override int Read(byte[] buffer, int offset, int count) => throw new NotSupportedException();
        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();
        public override void SetLength(long value) => throw new NotSupportedException();
        public override void Write(byte[] buffer, int offset, int count)
        {
            var chars = new char[_decoder.GetCharCount(buffer, offset, count)];
            _decoder.GetChars(buffer, offset, count, chars, 0);
            writer.Write(chars);
        }
    }
}
