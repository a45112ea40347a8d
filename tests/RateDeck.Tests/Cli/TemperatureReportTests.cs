using System.Text.Json;
using RateDeck.Cli;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>Every verb's summary and JSON carry kT in the deck's unit and in kelvin.</summary>
public sealed class TemperatureReportTests
{
    // The two-level demo deck has kT = 0.05 eV. T = kT / k_B with k_B = 8.617333262e-5 eV/K
    // (CODATA 2018, exact since the 2019 SI): T = 580.2262 K.
    private const double _kelvin = 0.05 / 8.617333262e-5;

    public static TheoryData<string> Verbs => new() { "check", "stiffness", "run", "steady" };

    [Trait("Through", "program")]
    [Theory]
    [MemberData(nameof(Verbs))]
    public void EverySummary_ShowsKTInTheDecksUnitAndInKelvin(string verb)
    {
        using var folder = new Support.TempFolder();
        var (code, output, error) = CliRunner.Run(Arguments(verb, folder.Path, json: false));

        Assert.True(code == ExitCodes.Success, error);
        Assert.Contains("temperature  kT = 5e-2 eV (T = 580 K)", output, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Theory]
    [MemberData(nameof(Verbs))]
    public void EveryJson_CarriesKTItsUnitAndTheTemperatureInKelvin(string verb)
    {
        using var folder = new Support.TempFolder();
        var (code, output, error) = CliRunner.Run(Arguments(verb, folder.Path, json: true));

        Assert.True(code == ExitCodes.Success, error);
        var root = JsonDocument.Parse(output).RootElement;
        Assert.Equal(0.05, root.GetProperty("kt").GetDouble());
        Assert.Equal("eV", root.GetProperty("energy_unit").GetString());
        Assert.Equal(_kelvin, root.GetProperty("temperature_kelvin").GetDouble(), 1e-9 * _kelvin);
    }

    [Trait("Through", "program")]
    [Fact]
    public void DeckInModelUnits_SaysItHasNoKelvin()
    {
        using var folder = new Support.TempFolder();
        var deck = Support.ResultFiles.FullMatrixDeck(folder, "model", "[0, 1, 2]", "a,b,1\nb,a,1\nb,c,1\nc,b,1\n", "[run]\nt_end = 1");

        var (_, output, _) = CliRunner.Run("check", deck);
        var (_, json, _) = CliRunner.Run("check", deck, "--json");

        Assert.Contains("temperature  kT = 1 (model energy units, no temperature in kelvin)", output, StringComparison.Ordinal);
        Assert.Equal(JsonValueKind.Null, JsonDocument.Parse(json).RootElement.GetProperty("temperature_kelvin").ValueKind);
    }

    private static string[] Arguments(string verb, string folder, bool json)
    {
        var arguments = new List<string> { verb, CliRunner.DemoDeck("two-level.toml") };
        if (verb is "run" or "steady" or "check")
        {
            arguments.AddRange(["--out", folder]);
        }

        if (verb == "run")
        {
            arguments.Add("--no-plots");
        }

        if (json)
        {
            arguments.Add("--json");
        }

        return [.. arguments];
    }
}
