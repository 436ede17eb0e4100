using System.CommandLine;
using TaskPhrase.Cli.Commands;

namespace TaskPhrase.Cli;

/// <summary>Builds the <c>taskphrase</c> command tree and runs it.</summary>
internal static class CliApp
{
    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
        => Run(args, new CliContext { Out = stdout, Err = stderr, Interactive = !Console.IsOutputRedirected && !Console.IsInputRedirected });

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
        var config = new InvocationConfiguration { Output = context.Out, Error = context.Err };
        var parse = root.Parse(args);
        if (parse.Errors.Count > 0 && !args.Contains("--help") && !args.Contains("-h"))
        {
            // Bad usage is exit 2, with the parser's message on one line each and a pointer to --help.
            foreach (var error in parse.Errors) context.Err.WriteLine($"error: {error.Message}");
            context.Err.WriteLine("Run 'taskphrase --help' or 'taskphrase VERB --help' for usage.");
            return ExitCodes.BadInput;
        }
        return parse.Invoke(config);
    }
}
