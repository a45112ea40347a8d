using System.Globalization;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>Issue 8 section 5: listed output times, K as CSV on request, and the Boltzmann-plot table of a run.</summary>
public sealed class PractitionerOutputTests
{
    /// <summary>kT of 600 K in cm-1 with the CODATA 2018 exact k_B, h and c (mpmath, 30 digits: 600 k / (h c)).</summary>
    private const double _kTAt600K = 417.020880291676443;

    /// <summary>The three-level demo's states and rates with measurement times listed instead of a grid.</summary>
    private static string ListedTimesDeck(TempFolder folder)
    {
        File.Copy(CliRunner.DemoDeck("three-level-rates.csv"), folder.File("rates.csv"));
        File.WriteAllText(folder.File("listed.toml"), """
            format = 1
            [units]
            energy = "cm-1"
            [temperature]
            kelvin = 600.0
            [states]
            coordinates = [0.0, 450.0, 1200.0]
            labels = ["lower", "middle", "upper"]
            [energies]
            values = [0.0, 450.0, 1200.0]
            [weights]
            values = [1, 3, 5]
            [transfer]
            kind = "one_way"
            direction = "toward_smaller"
            csv = "rates.csv"
            [initial]
            state = "upper"
            [run]
            t_end = 1.0e-4
            times = [1e-6, 2.5e-6, 1e-5]
            """);
        return folder.File("listed.toml");
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_ListedOutputTimes_AreTheRowsExactlyThenTEnd()
    {
        using var folder = new TempFolder();
        var (code, _, error) = CliRunner.Run("run", ListedTimesDeck(folder), "--no-plots", "--out", folder.File("out"));

        Assert.True(code == ExitCodes.Success, error);
        var times = ResultRows(folder.File("out/populations-exact.csv")).Select(r => r[0]).ToArray();
        Assert.Equal(["0", "1E-06", "2.5E-06", "1E-05", "0.0001"], times);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_WithWriteRates_WritesEveryEntryOfKAsTripletsWithTheCompletedRate()
    {
        using var folder = new TempFolder();
        var (code, _, error) = CliRunner.Run("run", ListedTimesDeck(folder), "--no-plots", "--write-rates", "--out", folder.File("out"));
        Assert.True(code == ExitCodes.Success, error);

        var rows = ResultRows(folder.File("out/rate-matrix.csv"));
        var rate = rows.ToDictionary(r => (r[0], r[1]), r => double.Parse(r[2], CultureInfo.InvariantCulture));
        Assert.Equal(9, rate.Count);

        // Given: upper -> middle 3e5 /s (decks/three-level-rates.csv). Completed by detailed balance:
        // middle -> upper = 3e5 (g_upper/g_middle) exp(-(1200 - 450)/kT) = 82775.9037514031573 /s
        // (mpmath, 30 digits, with kT = 600 K in cm-1 from CODATA 2018).
        Assert.Equal(3e5, rate[("upper", "middle")]);
        Assert.Equal(82775.9037514031573, rate[("middle", "upper")], 82775.9 * 1e-12);

        // Conservation: every column of K sums to zero (no losses in this deck).
        foreach (var from in new[] { "lower", "middle", "upper" })
        {
            var column = rate.Where(e => e.Key.Item1 == from).Select(e => e.Value).ToArray();
            Assert.Equal(0, column.Sum(), Math.Abs(column.Min()) * 1e-14);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_FinalBoltzmannTable_AtEquilibriumFallsOnTheLineOfSlopeMinusOneOverKT()
    {
        // At t_end = 1e-4 s (about 30 relaxation times) the populations are Boltzmann's:
        // ln(n_i / g_i) = -E_i / kT + const, so each pair of levels gives the slope -1/kT.
        var rows = FinalBoltzmannRows();
        var energy = rows.Select(r => double.Parse(r[1], CultureInfo.InvariantCulture)).ToArray();
        var lnPerWeight = rows.Select(r => double.Parse(r[5], CultureInfo.InvariantCulture)).ToArray();
        for (var i = 1; i < rows.Length; i++)
        {
            var slope = (lnPerWeight[i] - lnPerWeight[0]) / (energy[i] - energy[0]);
            Assert.Equal(-1 / _kTAt600K, slope, 1e-9 / _kTAt600K);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_FinalBoltzmannTable_WritesTheWeightsAsTheDeckGivesThem()
    {
        // The deck says weights = [1, 3, 5]; the file says so too, character for character (not
        // exp(ln 3) = 3.0000000000000004), and n_i / g_i is the population divided by that g.
        var rows = FinalBoltzmannRows();
        Assert.Equal(["1", "3", "5"], rows.Select(r => r[2]));
        Assert.All(rows, row => Assert.Equal(Number(row[3]) / Number(row[2]), Number(row[4])));
    }

    /// <summary>The rows of boltzmann-final.csv after a run of <see cref="ListedTimesDeck"/>.</summary>
    private static string[][] FinalBoltzmannRows()
    {
        using var folder = new TempFolder();
        var (code, _, error) = CliRunner.Run("run", ListedTimesDeck(folder), "--no-plots", "--out", folder.File("out"));
        Assert.True(code == ExitCodes.Success, error);
        return ResultRows(folder.File("out/boltzmann-final.csv"));
    }

    private static double Number(string cell) => double.Parse(cell, CultureInfo.InvariantCulture);

    private static string[][] ResultRows(string path) =>
        [.. File.ReadAllLines(path).Where(l => !l.StartsWith('#')).Skip(1).Select(l => l.Split(','))];
}
