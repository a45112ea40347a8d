using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>Issue 8 section 5: a deck whose rates are per second, run and written in microseconds without editing a number.</summary>
public sealed class TimeUnitRunTests
{
    /// <summary>
    /// A two-level deck as docs/deck-format.md describes it: levels 0.1 eV apart, degeneracies 1 and
    /// 3, kT = 0.05 eV, a measured downward rate of 2000 per second, everything in the upper level at
    /// t = 0, times in seconds; <paramref name="outputUnit"/> is written as [units] output_time.
    /// </summary>
    private static string Deck(TempFolder folder, string? outputUnit)
    {
        File.WriteAllText(folder.File("rates.csv"), "# per second\nfrom,to,rate\nupper,ground,2000\n");
        var output = outputUnit is null ? "" : $"output_time = \"{outputUnit}\"";
        File.WriteAllText(folder.File("deck.toml"), $"""
            format = 1
            title = "two levels, rates per second"
            [units]
            energy = "eV"
            time = "s"
            {output}
            [temperature]
            kT = 0.05
            [states]
            labels = ["ground", "upper"]
            coordinates = [0.0, 0.1]      # the level energy, eV
            [weights]
            values = [1, 3]
            [energies]
            values = [0.0, 0.1]
            [initial]
            state = "upper"
            [run]
            times = [1.0e-4, 2.5e-4, 7.5e-4]
            t_end = 2.0e-3
            [transfer]
            csv = "rates.csv"
            kind = "one_way"
            direction = "toward_smaller"
            """);
        return folder.File("deck.toml");
    }

    private static double[][] Run(TempFolder folder, string? outputUnit)
    {
        var (code, output, error) = CliRunner.Run("run", Deck(folder, outputUnit), "--no-plots", "--out", folder.File("out"));
        Assert.True(code == ExitCodes.Success, output + error);
        return ResultFiles.Rows(folder.File("out/populations-exact.csv"));
    }

    [Trait("Through", "program")]
    [Fact]
    public void RunInMicroseconds_GivesTheSamePopulationsAtTheSameInstantsAsInSeconds()
    {
        using var inSeconds = new TempFolder();
        using var inMicroseconds = new TempFolder();
        var seconds = Run(inSeconds, null);
        var microseconds = Run(inMicroseconds, "us");

        // The deck's times written in us are its numbers times 1e6 exactly (SI Brochure, table 7: micro = 1e-6).
        Assert.Equal([0, 100, 250, 750, 2000], microseconds.Select(row => row[0]));
        Assert.Equal([0, 1e-4, 2.5e-4, 7.5e-4, 2e-3], seconds.Select(row => row[0]));

        // Two-level relaxation (textbook first-order kinetics, e.g. Atkins' Physical Chemistry):
        // P_upper(t) = P_eq + (1 - P_eq) exp(-(k_down + k_up) t), k_up = k_down (g_u/g_g) exp(-dE/kT).
        var kUp = 2000 * 3 * Math.Exp(-2);
        var rate = 2000 + kUp;
        var equilibriumUpper = kUp / rate;
        for (var k = 0; k < seconds.Length; k++)
        {
            var expected = equilibriumUpper + (1 - equilibriumUpper) * Math.Exp(-rate * seconds[k][0]);
            Assert.Equal(expected, seconds[k][2], 1e-12);
            Assert.Equal(expected, microseconds[k][2], 1e-12);
            Assert.Equal(1 - expected, microseconds[k][1], 1e-12);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void RunInMicroseconds_WritesRatesPerMicrosecond()
    {
        using var folder = new TempFolder();
        var (code, output, error) = CliRunner.Run("run", Deck(folder, "us"), "--no-plots", "--write-rates", "--out", folder.File("out"));
        Assert.True(code == ExitCodes.Success, error);

        // 2000 per second is 2e-3 per microsecond; the summary says which unit it writes in.
        var rows = File.ReadAllLines(folder.File("out/rate-matrix.csv")).Where(l => l.StartsWith("upper,ground,", StringComparison.Ordinal));
        Assert.Equal("upper,ground,0.002", Assert.Single(rows));
        Assert.Contains("time unit    us in every result", output, StringComparison.Ordinal);
    }
}
