using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// Command-line mistakes a user makes are refused with exit 2 and a message naming the option,
/// before anything runs or is written: never a silent guess (issue 9 §8).
/// </summary>
public sealed class CommandLineMistakeTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    [Fact]
    public void ValuedOptionFollowedByAnotherOption_IsAMissingValueNotAValue()
    {
        var output = _folder.File("out");
        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--dt", "--exact-only", "--out", output);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("--dt", error, StringComparison.Ordinal);
        Assert.DoesNotContain("'--exact-only'", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(output));
    }

    [Fact]
    public void RepeatedSingleOption_IsRefusedNotSilentlyTheLast()
    {
        var (first, second) = (_folder.File("first"), _folder.File("second"));
        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--out", first, "--out", second);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("--out", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(first) || Directory.Exists(second));
    }

    [Fact]
    public void EmptyOutputFolder_IsRefusedAsBadInput()
    {
        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--out", "");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("--out", error, StringComparison.Ordinal);
        Assert.DoesNotContain("internal error", error, StringComparison.Ordinal);
    }

    [Fact]
    public void OverrideBelowAPlainKey_SaysTheKeyHoldsAValueWithoutSuggestingItself()
    {
        var (code, _, error) = CliRunner.Run("check", CliRunner.DemoDeck("two-level.toml"), "--set", "title.x=1");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("--set title.x=1: `title` holds a value, not a table; set it as title=...\n", error);
    }
}
