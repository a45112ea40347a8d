using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>The documented exit codes (docs/cli.md) and the shape of the verbs' JSON, which scripts rely on.</summary>
public sealed class ExitCodeTests
{
    [Trait("Through", "program")]
    [Fact]
    public void Check_OnDemoDeck_ExitsZeroWithRequiredJsonKeys()
    {
        var (code, output, error) = CliRunner.Run("check", CliRunner.DemoDeck("two-level.toml"), "--json");

        Assert.True(code == ExitCodes.Success, error);
        using var json = JsonDocument.Parse(output);
        var root = json.RootElement;
        foreach (var key in new[] { "ok", "states", "conservation_error", "detailed_balance_violation", "closed_classes", "null_space_dimension" })
        {
            Assert.True(root.TryGetProperty(key, out _), $"missing key {key}");
        }

        Assert.True(root.GetProperty("ok").GetBoolean());
        Assert.Equal(2, root.GetProperty("states").GetInt32());
        Assert.Equal(["ground", "upper"], root.GetProperty("closed_classes")[0].EnumerateArray().Select(e => e.GetString()!));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Stiffness_WithStepAboveRk4Limit_ExitsThree()
    {
        var (_, json, _) = CliRunner.Run("stiffness", CliRunner.DemoDeck("cascade.toml"), "--json");
        var limit = JsonDocument.Parse(json).RootElement.GetProperty("dt_rk4_stable").GetDouble();

        var below = CliRunner.Run("stiffness", CliRunner.DemoDeck("cascade.toml"), "--dt", (0.99 * limit).ToString("R", System.Globalization.CultureInfo.InvariantCulture));
        var above = CliRunner.Run("stiffness", CliRunner.DemoDeck("cascade.toml"), "--dt", (1.01 * limit).ToString("R", System.Globalization.CultureInfo.InvariantCulture));

        Assert.Equal(ExitCodes.Success, below.ExitCode);
        Assert.Equal(ExitCodes.UnsafeTimeStep, above.ExitCode);
        Assert.Contains("UNSAFE", above.Out, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Stiffness_JsonCarriesEveryStepLimit()
    {
        var (code, output, _) = CliRunner.Run("stiffness", CliRunner.DemoDeck("cascade.toml"), "--json");

        Assert.Equal(ExitCodes.Success, code);
        var root = JsonDocument.Parse(output).RootElement;
        var rho = root.GetProperty("spectral_radius").GetDouble();
        // SPEC 2: Euler 2/rho, rule of thumb 1/rho, RK4 2.785/rho on a real negative spectrum.
        Assert.Equal(2 / rho, root.GetProperty("dt_euler_stable").GetDouble(), 1e-12);
        Assert.Equal(1 / rho, root.GetProperty("dt_rule_of_thumb").GetDouble(), 1e-12);
        Assert.Equal(2.785 / rho, root.GetProperty("dt_rk4_stable").GetDouble(), 3e-4 / rho);
        foreach (var key in new[] { "slowest_rate", "stiffness_ratio", "dt_positive" })
        {
            Assert.True(root.GetProperty(key).GetDouble() > 0, key);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void BadDeck_ExitsTwoWithFileLineColumnAndNoStackTrace()
    {
        using var folder = new TempFolder();
        var deck = folder.File("broken.toml");
        File.WriteAllText(deck, "format = 1\ntitle = \"broken\"\n[temperature]\nkT = = 1\n");

        var (code, output, error) = CliRunner.Run("check", deck);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", output);
        Assert.StartsWith($"{deck}:4:", error, StringComparison.Ordinal);
        Assert.DoesNotContain("   at ", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void MissingDeck_ExitsTwo()
    {
        var (code, _, error) = CliRunner.Run("check", "no-such-deck.toml");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("no-such-deck.toml", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("chek", "check")]
    [InlineData("stifness", "stiffness")]
    public void UnknownVerb_ExitsTwoWithHint(string verb, string hint)
    {
        var (code, _, error) = CliRunner.Run(verb, "deck.toml");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"`{hint}`", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void UnknownOption_ExitsTwoWithHint()
    {
        var (code, _, error) = CliRunner.Run("check", CliRunner.DemoDeck("two-level.toml"), "--jsn");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("`--json`", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void NonPositiveStep_ExitsTwo()
    {
        var (code, _, error) = CliRunner.Run("stiffness", CliRunner.DemoDeck("two-level.toml"), "--dt", "-1");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("--dt", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_OnMatrixWithoutDetailedBalance_ExitsFour()
    {
        using var folder = new TempFolder();
        // A cyclic three-state matrix: a -> b -> c -> a only; one-way edges break detailed balance.
        var deck = ResultFiles.FullMatrixDeck(folder, "cycle", "[0, 0, 0]", "a,b,1\nb,c,1\nc,a,1\n", "[run]\nt_end = 1");

        var (code, output, _) = CliRunner.Run("check", deck);

        Assert.Equal(ExitCodes.CheckFailed, code);
        Assert.Contains("FAIL", output, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Help_ListsEveryVerbAndExitsZero()
    {
        var (code, output, _) = CliRunner.Run("help");

        Assert.Equal(ExitCodes.Success, code);
        Assert.Contains("check", output, StringComparison.Ordinal);
        Assert.Contains("stiffness", output, StringComparison.Ordinal);
    }
}
