using RateDeck.Cli;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>Every verb has its own help under --help and -h, made from the parser's declarations (issue 9 §2).</summary>
public sealed class CommandLineHelpTests
{
    [Trait("Through", "program")]
    [Theory]
    [MemberData(nameof(CliRunner.Verbs), MemberType = typeof(CliRunner))]
    public void EveryVerb_HelpAndShortHelp_ShowItsUsageAndEveryOptionItDeclares(string verb)
    {
        var declared = Commands.Declaration().Subcommands.Single(c => c.Name == verb);

        var help = CliRunner.Run(verb, "--help");
        var shortHelp = CliRunner.Run(verb, "-h");

        Assert.Equal(ExitCodes.Success, help.ExitCode);
        Assert.Equal(help.Out, shortHelp.Out);
        Assert.Contains($"ratedeck {verb}", help.Out, StringComparison.Ordinal);
        Assert.All(declared.Options.Where(o => !o.Hidden), option => Assert.Contains(option.Name, help.Out, StringComparison.Ordinal));
        Assert.Equal("", help.Error);
    }

    [Trait("Through", "program")]
    [Fact]
    public void HelpVerb_WithAVerb_PrintsThatVerbsHelp()
    {
        Assert.Equal(CliRunner.Run("run", "--help").Out, CliRunner.Run("help", "run").Out);
    }

    [Trait("Through", "program")]
    [Fact]
    public void NoArguments_ShowsTheVerbsOnStandardErrorWithExitTwo()
    {
        var (code, output, error) = CliRunner.Run();

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", output);
        Assert.Contains("stiffness", error, StringComparison.Ordinal);
    }
}
