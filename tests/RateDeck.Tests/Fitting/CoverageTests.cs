using RateDeck.Fitting;
using RateDeck.LinearAlgebra;
using RateDeck.Tests.Support;
using Xunit;
using Xunit.Abstractions;

namespace RateDeck.Tests.Fitting;

/// <summary>
/// Honest error bars: synthetic data from the two-level demo deck at its kT (0.05 eV) plus seeded
/// Gaussian noise, both populations observed at 30 times, kT fitted 200 times from 0.1 eV. For a Gaussian estimate the true value lies within 1 and 2 standard
/// errors with probability 68.3 % and 95.4 % (common practice); the issue asks for 92 to 99 % at
/// two standard errors. With 200 fits the binomial standard deviation of the 2-SE fraction is
/// about 1.5 points.
/// </summary>
public sealed class CoverageTests(ITestOutputHelper output)
{
    private const double _trueKT = 0.05;
    private const int _seeds = 200;

    [Fact]
    public void TrueKTLiesWithinTwoStandardErrorsInNinetyTwoToNinetyNinePercentOfSeededFits()
    {
        using var folder = new TempFolder();
        var deck = DemoFitDeck.Write(folder, "two-level", "kT = { start = 0.1, log = true }", Enumerable.Range(1, 30).Select(k => k * 1.5e-4).ToArray(), ["ground", "upper"]);
        var algebra = LinearAlgebraProviders.Select(null, out _);
        var within1 = 0;
        var within2 = 0;
        for (var seed = 1; seed <= _seeds; seed++)
        {
            SyntheticData.Fill(deck, [_trueKT], _ => DemoFitDeck.Noise, seed);
            var outcome = Fitter.Fit(deck, [], algebra, new FitOptions());
            Assert.True(outcome.Report.Converged, $"seed {seed}: {outcome.Report.Best.Stop} after {outcome.Report.Best.Iterations} iterations at kT = {outcome.Report.Parameters[0].Value}, RSS {outcome.Report.Rss}");
            var estimate = outcome.Report.Parameters[0];
            var distance = Math.Abs(estimate.Value - _trueKT) / estimate.StandardError;
            within1 += distance <= 1 ? 1 : 0;
            within2 += distance <= 2 ? 1 : 0;
        }

        var fraction1 = (double)within1 / _seeds;
        var fraction2 = (double)within2 / _seeds;
        output.WriteLine($"coverage over {_seeds} seeds: within 1 SE {fraction1:P1}, within 2 SE {fraction2:P1}");
        Assert.InRange(fraction2, 0.92, 0.99);
        Assert.InRange(fraction1, 0.58, 0.78);
    }
}

/// <summary>A demo deck (with its rate CSV) copied into a folder with a [fit] table appended, observing some states at given times.</summary>
internal static class DemoFitDeck
{
    /// <summary>Absolute standard deviation of the synthetic noise (populations are of order 0.1 to 1).</summary>
    public const double Noise = 0.01;

    public static string Write(TempFolder folder, string demo, string free, double[] times, string[] columns, bool csvDemo = true)
    {
        if (csvDemo)
        {
            File.Copy(Cli.CliRunner.DemoDeck($"{demo}-rates.csv"), folder.File($"{demo}-rates.csv"));
        }

        SyntheticData.WriteTemplate(folder.File($"{demo}-data.csv"), times, columns);
        var text = File.ReadAllText(Cli.CliRunner.DemoDeck($"{demo}.toml")) + $"""

            [fit.free]
            {free}

            [fit.data.synthetic]
            csv = "{demo}-data.csv"
            """;
        var path = folder.File($"{demo}-fit.toml");
        File.WriteAllText(path, text);
        return path;
    }
}
