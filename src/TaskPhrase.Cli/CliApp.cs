using System.CommandLine;

namespace TaskPhrase.Cli;

/// <summary>Builds the <c>taskphrase</c> command tree and runs it.</summary>
internal static class CliApp
{
    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
    {
        var root = new RootCommand("taskphrase: resolve commands to approved robot-arm tasks, and check, build and audit task registries.");
        var config = new InvocationConfiguration { Output = stdout, Error = stderr };
        return root.Parse(args).Invoke(config);
    }
}
