using System.CommandLine;
using System.CommandLine.Parsing;
using TaskPhrase.Cli.Commands;
using TaskPhrase.Onnx;

namespace TaskPhrase.Cli;

/// <summary>Builds the <c>taskphrase</c> command tree and runs it.</summary>
internal static class CliApp
{
    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
        => Run(args, new CliContext
        {
            Out = stdout,
            Err = stderr,
            Interactive = !Console.IsOutputRedirected && !Console.IsInputRedirected,
            LoadBatchModel = dir =>
            {
                var batch = OnnxEmbedderOptions.ForBatchWork();
                return dir is null ? OnnxEmbedder.CreateDefault(batch) : OnnxEmbedder.Create(dir, batch);
            },
        });

    public static int Run(string[] args, CliContext context)
    {
        var root = new RootCommand("taskphrase: resolve spoken or typed commands to approved robot-arm tasks, and check, build and audit task registries.")
        {
            CommonOptions.Verbose(),
        };
        root.Subcommands.Add(CheckCommand.Create(context));
        root.Subcommands.Add(BuildCommand.Create(context));
        root.Subcommands.Add(ResolveCommand.Create(context));
        root.Subcommands.Add(AuditCommand.Create(context));
        root.Subcommands.Add(TuneCommand.Create(context));
        root.Subcommands.Add(ProbesCommand.Create(context));
        root.Subcommands.Add(EmbedCommand.Create(context));
        root.Subcommands.Add(ServeCommand.Create(context));
        root.Subcommands.Add(QuantizeCommand.Create(context));
        root.Subcommands.Add(PrepareCommand.Create(context));
        root.Subcommands.Add(PoolLayersCommand.Create(context));
        var parse = root.Parse(args);
        if (UsageErrors(parse) is { Count: > 0 } errors)
        {
            // One line per mistake, the exit code of bad usage, and no help screen: 'VERB --help' shows that.
            string verb = parse.CommandResult.Command is RootCommand ? "taskphrase" : $"taskphrase {parse.CommandResult.Command.Name}";
            foreach (var message in errors) context.Err.WriteLine($"error: {message} (see '{verb} --help')");
            return ExitCodes.BadInput;
        }
        var config = new InvocationConfiguration { Output = context.Out, Error = context.Err };
        return parse.Invoke(config);
    }

    /// <summary>
    /// The parser's errors, plus option-like words (<c>--jsn</c>, <c>-x</c>) that the parser would otherwise take as
    /// utterances or texts; such a word is accepted as text only after <c>--</c>.
    /// </summary>
    private static List<string> UsageErrors(ParseResult parse)
    {
        var errors = parse.Errors.Select(e => e.Message.TrimEnd('.')).Distinct().ToList();
        // An unknown word also makes the parser say that a command is missing: report the word only.
        if (parse.UnmatchedTokens.Count > 0)
            errors = errors.Where(e => parse.UnmatchedTokens.Any(t => e.Contains($"'{t}'", StringComparison.Ordinal))).ToList();
        foreach (var token in parse.Tokens)
        {
            if (token.Type == TokenType.DoubleDash) break;
            if (parse.UnmatchedTokens.Contains(token.Value)) continue;
            string v = token.Value;
            bool optionLike = v.StartsWith("--", StringComparison.Ordinal) && v.Length > 2 || v.Length == 2 && v[0] == '-' && char.IsLetter(v[1]);
            if (token.Type == TokenType.Argument && optionLike)
                errors.Add($"unknown option '{v}' (to give a text that starts with '-', put it after '--')");
        }
        return errors;
    }
}
