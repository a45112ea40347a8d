using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>`ratedeck init [FILE]` (issue 9 §3): a starter deck that checks clean and runs, and an existing file left alone unless --force.</summary>
public sealed class InitVerbTests
{
    [Trait("Through", "program")]
    [Theory]
    [InlineData("starter.toml")]
    [InlineData("a deck with spaces.toml")]
    public void Init_WritesAStarterDeckThatChecksCleanAndRuns(string fileName)
    {
        using var folder = new TempFolder();
        var deck = folder.File(fileName);

        var init = CliRunner.Run("init", deck);
        var check = CliRunner.Run("check", deck, "--json");
        var run = CliRunner.Run("run", deck, "--no-plots", "--out", folder.File("out"));

        Assert.Equal(ExitCodes.Success, init.ExitCode);
        Assert.True(check.ExitCode == ExitCodes.Success, check.Error);
        Assert.True(JsonDocument.Parse(check.Out).RootElement.GetProperty("ok").GetBoolean());
        Assert.True(run.ExitCode == ExitCodes.Success, run.Error);
        Assert.Contains("INVENTED", File.ReadAllText(deck), StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Init_OnAnExistingFile_LeavesItAloneWithExitFive_AndOverwritesItWithForce()
    {
        using var folder = new TempFolder();
        var deck = folder.File("mine.toml");
        File.WriteAllText(deck, "# my own deck\n");

        var refused = CliRunner.Run("init", deck);
        var kept = File.ReadAllText(deck);
        var forced = CliRunner.Run("init", deck, "--force");

        Assert.Equal(ExitCodes.OutputFailed, refused.ExitCode);
        Assert.Contains("--force", refused.Error, StringComparison.Ordinal);
        Assert.Equal("# my own deck\n", kept);
        Assert.Equal(ExitCodes.Success, forced.ExitCode);
        Assert.Equal(ExitCodes.Success, CliRunner.Run("check", deck).ExitCode);
        Assert.Equal([Path.GetFileName(deck)], folder.Entries());
    }
}
