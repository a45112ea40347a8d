using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// Command-line mistakes a user makes are refused with exit 2 and a message naming the option,
/// before anything runs or is written: never a silent guess (issue 9 §2 and §8). Switches take no
/// value, values are typed, and `--` ends the options.
/// </summary>
public sealed class CommandLineMistakeTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    [Trait("Through", "program")]
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

    [Trait("Through", "program")]
    [Fact]
    public void RepeatedSingleOption_IsRefusedNotSilentlyTheLast()
    {
        var (first, second) = (_folder.File("first"), _folder.File("second"));
        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--out", first, "--out", second);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("--out", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(first) || Directory.Exists(second));
    }

    [Trait("Through", "program")]
    [Fact]
    public void EmptyOutputFolder_IsRefusedAsBadInput()
    {
        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--out", "");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("--out", error, StringComparison.Ordinal);
        Assert.DoesNotContain("internal error", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void OverrideBelowAPlainKey_SaysTheKeyHoldsAValueWithoutSuggestingItself()
    {
        var (code, _, error) = CliRunner.Run("check", CliRunner.DemoDeck("two-level.toml"), "--set", "title.x=1");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("--set title.x=1: `title` holds a value, not a table; set it as title=...\n", error);
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("--json=no")]
    [InlineData("--json=true")]
    [InlineData("--no-plots=1")]
    public void SwitchGivenAValue_IsAUsageErrorAndRunsNothing(string switchWithValue)
    {
        var output = _folder.File("out");
        var (code, stdout, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--out", output, switchWithValue);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", stdout);
        Assert.Contains($"'{switchWithValue}'", error, StringComparison.Ordinal);
        Assert.Contains("takes no value", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(output));
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("fit", "--starts", "1.5", "whole number")]
    [InlineData("fit", "--seed", "-3", "whole number")]
    [InlineData("stiffness", "--dt", "fast", "positive number")]
    [InlineData("stiffness", "--t-end", "0", "positive number")]
    [InlineData("run", "--method", "rk5", "euler or rk4")]
    [InlineData("run", "--exact", "best", "auto, implicit or extended")]
    [InlineData("check", "--linalg", "gpu", "auto, native or managed")]
    public void ValueOfTheWrongType_IsAUsageErrorNamingTheOptionAndWhatItTakes(string verb, string option, string value, string takes)
    {
        var (code, stdout, error) = CliRunner.Run(verb, CliRunner.DemoDeck("two-level.toml"), option, value);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", stdout);
        Assert.Contains($"{option} takes", error, StringComparison.Ordinal);
        Assert.Contains(takes, error, StringComparison.Ordinal);
        Assert.Contains($"'{value}'", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("--set", "KEY=VALUE")]
    [InlineData("--out", "DIR")]
    [InlineData("--linalg", "auto|native|managed")]
    public void OptionWithoutValueAtTheEnd_SaysItNeedsOneAndWhatKind(string option, string valueName)
    {
        var result = CliRunner.Run("check", CliRunner.DemoDeck("two-level.toml"), option);

        Assert.Equal((ExitCodes.BadInput, ""), (result.ExitCode, result.Out));
        Assert.StartsWith($"ratedeck check: {option} needs a value ({valueName})", result.Error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void DoubleDash_EndsTheOptions_SoAWordLikeAnOptionIsTheDeck()
    {
        // After `--`, "--json" is the deck's file name, not the switch: the deck is looked for and not found.
        var (code, stdout, error) = CliRunner.Run("check", "--", "--json");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", stdout);
        Assert.Contains("--json", error, StringComparison.Ordinal);
        Assert.DoesNotContain("no option", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void DoubleDash_BeforeTheDeck_RunsAsWithout()
    {
        var deck = CliRunner.DemoDeck("two-level.toml");

        var (code, stdout, _) = CliRunner.Run("check", "--json", "--", deck);

        Assert.Equal(ExitCodes.Success, code);
        Assert.Equal(CliRunner.Run("check", deck, "--json").Out, stdout);
    }

    [Trait("Through", "program")]
    [Fact]
    public void TwoDecks_AreRefusedNamingBoth()
    {
        var (code, _, error) = CliRunner.Run("check", "a.toml", "b.toml");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("'a.toml' and 'b.toml'", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void DeckNamedLikeAResponseFile_IsAPathNotAListOfArguments()
    {
        var list = _folder.File("args");
        File.WriteAllText(list, "--json\n");

        var (code, _, error) = CliRunner.Run("check", "@" + list);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("@" + list, error, StringComparison.Ordinal);
    }
}
