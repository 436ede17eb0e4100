namespace TaskPhrase.Cli.Tests;

public class SmokeTests
{
    [Fact]
    public void Run_Help_ExitsZero() => Assert.Equal(0, CliApp.Run(["--help"], new StringWriter(), new StringWriter()));
}
