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
        root.Subcommands.Add(EmbedCommand.Create(context));
        root.Subcommands.Add(ServeCommand.Create(context));
        var config = new InvocationConfiguration { Output = context.Out, Error = context.Err };
        return root.Parse(args).Invoke(config);
    }
}
