using System.Globalization;
using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>The run verb end to end on a deck the assembler stores sparse.</summary>
public sealed class SparseRunTests
{
    [Trait("Through", "program")]
    [Fact]
    public void Run_OnNearestNeighbourLadder_TakesSparsePathAndMatchesCosineExpansion()
    {
        // 1200 states, equal energies, unit rate between neighbours: the reflecting random walk,
        // P_i(t) = sum_k e^(l_k t) v_k(i) v_k(0) / |v_k|^2 with l_k = -2(1 - cos(pi k / N)) and
        // v_k(i) = cos(pi k (i + 1/2) / N) (G. Strang, SIAM Review 41 (1999) 135), from state 1.
        const int n = 1200;
        using var folder = new TempFolder();
        var deck = folder.File("ladder.toml");
        File.WriteAllText(deck, UniformLadder.Deck(n, slope: 0, endTime: 5000, outputs: 4, start: 1, logSpacing: false));

        var (code, output, error) = CliRunner.Run("run", deck, "--json", "--no-plots", "--out", folder.File("out"));

        Assert.True(code == ExitCodes.Success, error);
        var root = JsonDocument.Parse(output).RootElement;
        Assert.Equal("contour-exponential", root.GetProperty("propagator").GetString());
        var rows = File.ReadAllLines(Path.Combine(folder.File("out"), "populations-exact.csv")).Where(l => !l.StartsWith('#')).Skip(1)
            .Select(l => l.Split(',').Select(c => double.Parse(c, CultureInfo.InvariantCulture)).ToArray()).ToArray();
        foreach (var row in rows)
        {
            foreach (var i in new[] { 0, 1, 10, 100, 600, n - 1 })
            {
                var expected = ReflectingWalk.Population(n, 1.0, 0, i, row[0]);

                Assert.True(Math.Abs(row[1 + i] - expected) <= 1e-10, $"state {i + 1} at t = {row[0]}: {row[1 + i]} vs {expected}");
            }
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_OnASparseLadderTooSteepForTheContourPathAndTooLargeForADenseOne_RefusesAndWritesNothing()
    {
        // pi_i proportional to e^(-0.07 i) over 13,000 states spans 0.07 * 12,999 / ln 10 = 395.2
        // decades (arithmetic). From the least probable state the contour path's rounding is far
        // above the 1e-9 the exact paths keep, and 13,000 states are above the dense paths' limit:
        // no exact path can be trusted, so the run must refuse rather than print populations.
        const int n = 13_000;
        using var folder = new TempFolder();
        var deck = folder.File("steep.toml");
        File.WriteAllText(deck, UniformLadder.Deck(n, slope: 0.07, endTime: 100, outputs: 5, start: n));

        var (code, output, error) = CliRunner.Run("run", deck, "--exact-only", "--no-plots", "--out", folder.File("out"));

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", output);
        Assert.StartsWith("ratedeck run: no exact path fits: pi spans 395 decades, so the sparse contour path's rounding for this initial state is estimated at ", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(folder.File("out")));
    }
}
