using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// A deck without pumping or loss keeps its total population exactly (common practice: K's columns
/// sum to zero). What a run prints about its exact path's drift from that: on the 12,000-state
/// ladder (t rho about 1.4e8, slowest rate 7.6e-8 against rho 4) the contour path's rounding moves
/// the total by about 1e-10, and the run must say that populations below the drift are not resolved;
/// on a small deck the drift is rounding of a few units in the last place and nothing is said.
/// </summary>
public sealed class ConservationDriftTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    [Trait("Through", "program")]
    [Fact]
    public void StiffLadder_RunReportsTheMeasuredDriftAndTheResolutionItLeaves()
    {
        const int count = 12_000;
        var deck = _folder.File("ladder.toml");
        File.WriteAllText(deck, UniformLadder.Deck(count, 2.0 / count, endTime: count * (double)count / 4, outputs: 6));

        var json = CliRunner.Run("run", deck, "--exact-only", "--no-plots", "--json", "--out", _folder.File("json"));
        var text = CliRunner.Run("run", deck, "--exact-only", "--no-plots", "--out", _folder.File("text"));

        Assert.True(json.ExitCode == ExitCodes.Success, json.Error);
        using var summary = JsonDocument.Parse(json.Out);
        var drift = summary.RootElement.GetProperty("exact_conservation_drift").GetDouble();
        var finalTotal = summary.RootElement.GetProperty("final_total_population").GetDouble();
        // The start holds population 1: the drift is at least the final total's distance from it.
        Assert.True(drift >= Math.Abs(finalTotal - 1), $"drift {drift:R}, final total {finalTotal:R}");
        Assert.True(drift > 1e-12, $"drift {drift:R}: the case no longer shows the contour path's rounding; choose a stiffer ladder");
        Assert.Contains(text.Out.Split('\n'), line => line.StartsWith("  note: the exact path keeps the conserved total population only to ", StringComparison.Ordinal));
    }

    [Trait("Through", "program")]
    [Fact]
    public void SmallDeck_DriftIsRoundingAndNothingIsSaid()
    {
        var deck = CliRunner.DemoDeck("two-level.toml");

        var json = CliRunner.Run("run", deck, "--exact-only", "--no-plots", "--json", "--out", _folder.File("json"));
        var text = CliRunner.Run("run", deck, "--exact-only", "--no-plots", "--out", _folder.File("text"));

        Assert.True(json.ExitCode == ExitCodes.Success, json.Error);
        using var summary = JsonDocument.Parse(json.Out);
        Assert.True(summary.RootElement.GetProperty("exact_conservation_drift").GetDouble() < 1e-14, json.Out);
        Assert.DoesNotContain("keeps the conserved total", text.Out, StringComparison.Ordinal);
    }
}
