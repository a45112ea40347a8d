using System.Globalization;
using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// check, stiffness and run on a 12,000-state nearest-neighbour ladder written as a user would:
/// by default the spectrum's extremes only, with the spectral radius, the slowest rate and the
/// stiffness ratio of the closed form (<see cref="UniformLadder"/>, Takacs 1962, from memory, checked
/// with SciPy), spectrum.csv saying which modes it holds; --full-spectrum gives every mode and the same
/// figures. The suite runs once per provider (RATEDECK_LINALG), and the verbs take that provider.
/// </summary>
public sealed class LargeLadderSpectrumTests
{
    private const int _count = 12_000;
    private const double _slope = 2.0 / _count;
    private static readonly double _rho = UniformLadder.SpectralRadius(_count, _slope);
    private static readonly double _slowest = UniformLadder.SlowestRate(_count, _slope);

    [Trait("Through", "program")]
    [Fact]
    public void Stiffness_ByDefault_TakesTheExtremesAndGivesTheClosedFormFigures()
    {
        var root = Json("stiffness");

        Assert.Contains("extremes only", root.GetProperty("spectrum_coverage").GetString(), StringComparison.Ordinal);
        AssertFigures(root);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Stiffness_WithFullSpectrum_ComputesEveryModeAndGivesTheSameFigures()
    {
        var root = Json("stiffness", "--full-spectrum");

        Assert.Equal(JsonValueKind.Null, root.GetProperty("spectrum_coverage").ValueKind);
        AssertFigures(root);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_ByDefault_WritesThePartialSpectrumWithItsModeNumbersAndSaysSo()
    {
        using var folder = new TempFolder();
        var deck = WriteDeck(folder);
        var outputFolder = folder.File("out");

        var (code, output, error) = CliRunner.Run("run", deck, "--exact-only", "--no-plots", "--out", outputFolder);

        Assert.True(code == ExitCodes.Success, error);
        Assert.Contains(output.Split('\n'), line => line.StartsWith("spectrum ", StringComparison.Ordinal) && line.Contains("extremes only", StringComparison.Ordinal));
        var lines = File.ReadAllLines(Path.Combine(outputFolder, "spectrum.csv"));
        Assert.Contains(lines, line => line.StartsWith("# coverage: extremes only", StringComparison.Ordinal));
        var rows = lines.Where(line => !line.StartsWith('#')).Skip(1).Select(line => line.Split(',')).ToArray();
        var modes = rows.Select(row => int.Parse(row[0], CultureInfo.InvariantCulture)).ToArray();
        Assert.Equal([.. Enumerable.Range(1, 8), .. Enumerable.Range(_count - 8, 9)], modes);
        // Mode 1 is the fastest (-rho), mode N - k the k-th slowest, mode N the zero mode.
        Assert.Equal(-_rho, Number(rows[0][1]), _rho * 1e-12);
        for (var k = 1; k <= 8; k++)
        {
            var expected = UniformLadder.Eigenvalue(_count, _slope, k);
            var found = Number(rows[^(k + 1)][1]);
            Assert.True(Math.Abs(found - expected) <= 1e-9 * Math.Abs(expected), $"mode {_count - k}: {found:R} vs {expected:R}");
        }

        Assert.Equal(0.0, Number(rows[^1][1]));
        var results = File.ReadAllLines(Path.Combine(outputFolder, "results.csv")).Where(line => !line.StartsWith('#')).ToArray();
        var header = results[0].Split(',');
        var values = results[1].Split(',');
        Assert.Equal(_rho, Number(values[Array.IndexOf(header, "spectral_radius")]), _rho * 1e-12);
        Assert.Equal(_slowest, Number(values[Array.IndexOf(header, "slowest_rate")]), _slowest * 1e-9);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_ByDefault_PassesOnTheExtremesAndNamesThePath()
    {
        var root = Json("check");

        Assert.True(root.GetProperty("ok").GetBoolean());
        Assert.Equal(1, root.GetProperty("null_space_dimension").GetInt32());
        Assert.Contains("Sturm-count bisection", root.GetProperty("spectrum_path").GetString(), StringComparison.Ordinal);
        Assert.Contains("extremes only", root.GetProperty("spectrum_coverage").GetString(), StringComparison.Ordinal);
    }

    /// <summary>The JSON summary of <paramref name="verb"/> on the deck, with <paramref name="options"/>; the verb must succeed.</summary>
    private static JsonElement Json(string verb, params string[] options)
    {
        using var folder = new TempFolder();
        var (code, output, error) = CliRunner.Run([verb, WriteDeck(folder), "--json", .. options]);
        Assert.True(code == ExitCodes.Success, error);
        return JsonDocument.Parse(output).RootElement.Clone();
    }

    private static string WriteDeck(TempFolder folder)
    {
        var deck = folder.File("ladder.toml");
        File.WriteAllText(deck, UniformLadder.Deck(_count, _slope, endTime: _count * (double)_count / 4, outputs: 6));
        return deck;
    }

    private static void AssertFigures(JsonElement root)
    {
        Assert.Equal(_rho, root.GetProperty("spectral_radius").GetDouble(), _rho * 1e-12);
        Assert.Equal(_slowest, root.GetProperty("slowest_rate").GetDouble(), _slowest * 1e-9);
        Assert.Equal(_rho / _slowest, root.GetProperty("stiffness_ratio").GetDouble(), _rho / _slowest * 1e-9);
    }

    private static double Number(string text) => double.Parse(text, CultureInfo.InvariantCulture);
}
