using System.Globalization;
using RateDeck.Fitting;
using RateDeck.LinearAlgebra;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Fitting;

/// <summary>
/// Recovery of known values from synthetic data (the truth is chosen here, the data are made by
/// the model at the truth plus seeded Gaussian noise). "Within the reported error" is checked at
/// two standard errors for one seeded draw (common practice: a 95 % band).
/// </summary>
public sealed class RecoveryTests
{
    private static readonly ILinearAlgebra _algebra = LinearAlgebraProviders.Select(null, out _);

    [Fact]
    public void KTAloneFromThePendulumLadderIsRecoveredWithinItsErrorAndTheMechanicsIsDerivedOnce()
    {
        using var folder = new TempFolder();
        var times = Enumerable.Range(0, 25).Select(k => 0.1 * Math.Pow(30000, k / 24.0)).ToArray();
        var deck = DemoFitDeck.Write(folder, "pendulum-ladder", "kT = { start = 0.8, log = true }", times, ["e1", "e10", "e20", "e30"], csvDemo: false);
        const double truth = 0.4;
        SyntheticData.Fill(deck, [truth], _ => 2e-4, seed: 7);
        var outcome = Fitter.Fit(deck, [], _algebra, new FitOptions());
        Assert.True(outcome.Report.Converged, outcome.Report.Best.Stop.ToString());
        var kT = outcome.Report.Parameters[0];
        Assert.True(Math.Abs(kT.Value - truth) <= 2 * kT.StandardError, $"kT {kT.Value} +- {kT.StandardError}, truth {truth}");
        Assert.True(kT.StandardError < 0.05 * truth, $"standard error {kT.StandardError} is not small");
        Assert.Equal(1, outcome.Problem.DataSets[0].MechanicsDerivations);
        // The Lagrangian does not read kT, so the Jacobian is the analytic one (TrajectorySensitivityTests checks it against SciPy).
        Assert.Equal("analytic", outcome.Report.Derivatives["kT"]);
    }

    [Fact]
    public void MeasuredTriangleFromADenseNoiselessSeriesComesBackToOnePartInAMillion()
    {
        using var folder = new TempFolder();
        var (deck, truth) = TriangleDeck.Write(folder, energies: [0, 0.5, 1.0, 1.5, 2.0, 2.5], observe: TriangleDeck.AllStates);
        SyntheticData.Fill(deck, truth, _ => 0, seed: 1);
        var outcome = Fitter.Fit(deck, [], _algebra, new FitOptions());
        Assert.True(outcome.Report.Converged, $"{outcome.Report.Best.Stop} RSS {outcome.Report.Rss} after {outcome.Report.Best.Iterations}: {string.Join(", ", outcome.Values.Select((v, k) => $"{v} ({truth[k]})"))}");
        for (var k = 0; k < truth.Length; k++)
        {
            FitRunner.Relative(truth[k], outcome.Values[k], 1e-6, outcome.Report.Parameters[k].Name);
        }
    }

    [Fact]
    public void MeasuredTriangleFromANoisySeriesLiesWithinItsReportedErrors()
    {
        using var folder = new TempFolder();
        var (deck, truth) = TriangleDeck.Write(folder, energies: [0, 0.5, 1.0, 1.5, 2.0, 2.5], observe: TriangleDeck.AllStates);
        SyntheticData.Fill(deck, truth, _ => 2e-3, seed: 3);
        var outcome = Fitter.Fit(deck, [], _algebra, new FitOptions());
        Assert.True(outcome.Report.Converged, outcome.Report.Best.Stop.ToString());
        var outside = outcome.Report.Parameters.Where((p, k) => Math.Abs(p.Value - truth[k]) > 3 * p.StandardError).Select(p => p.Name).ToList();
        Assert.True(outside.Count == 0, $"outside 3 standard errors: {string.Join(", ", outside)}");
    }

    [Fact]
    public void ARateBetweenStatesTheSeriesNeverReachesIsNamedAsUndetermined()
    {
        using var folder = new TempFolder();
        // s5 and s6 sit 40 kT above the rest and start empty: the exchange between them changes
        // the observed populations by about e^-40, far below any data.
        var (deck, truth) = TriangleDeck.Write(folder, energies: [0, 0.5, 1.0, 1.5, 40, 41], observe: TriangleDeck.AllStates, start: "s4");
        SyntheticData.Fill(deck, truth, _ => 0, seed: 1);
        var outcome = Fitter.Fit(deck, [], _algebra, new FitOptions());
        var undetermined = outcome.Report.Warnings.Where(w => w.Contains("do not determine", StringComparison.Ordinal)).ToList();
        Assert.Contains(undetermined, w => w.Contains("rate.s6.s5", StringComparison.Ordinal));
        var entry = outcome.Report.Parameters.Single(p => p.Name == "rate.s6.s5");
        Assert.True(double.IsNaN(entry.StandardError));
        var determined = outcome.Report.Parameters.Single(p => p.Name == "rate.s2.s1");
        Assert.False(double.IsNaN(determined.StandardError));
    }

    [Fact]
    public void AGlobalFitOfTwoTemperaturesRecoversTheSharedKernelWithSmallerErrorsThanEitherAlone()
    {
        using var folder = new TempFolder();
        double[] truth = [2.0, 0.7];
        var joint = GlobalDeck.Write(folder, "joint", ["cold", "hot"]);
        SyntheticData.Fill(joint, truth, _ => 0.005, seed: 11);
        var both = Fitter.Fit(joint, [], _algebra, new FitOptions());
        var cold = Fitter.Fit(GlobalDeck.Write(folder, "cold-only", ["cold"]), [], _algebra, new FitOptions());
        var hot = Fitter.Fit(GlobalDeck.Write(folder, "hot-only", ["hot"]), [], _algebra, new FitOptions());
        Assert.True(both.Report.Converged && cold.Report.Converged && hot.Report.Converged, $"{both.Report.Best.Stop} {cold.Report.Best.Stop} {hot.Report.Best.Stop} hot {string.Join(", ", hot.Values)} RSS {hot.Report.Rss}");
        for (var k = 0; k < truth.Length; k++)
        {
            var estimate = both.Report.Parameters[k];
            Assert.True(Math.Abs(estimate.Value - truth[k]) <= 2 * estimate.StandardError, $"{estimate.Name} {estimate.Value} +- {estimate.StandardError}, truth {truth[k]}");
            Assert.True(estimate.StandardError < cold.Report.Parameters[k].StandardError, $"{estimate.Name}: joint {estimate.StandardError} vs cold {cold.Report.Parameters[k].StandardError}");
            Assert.True(estimate.StandardError < hot.Report.Parameters[k].StandardError, $"{estimate.Name}: joint {estimate.StandardError} vs hot {hot.Report.Parameters[k].StandardError}");
        }
    }

    /// <summary>Six states, nine measured downward rates (to the next and the next-but-one state), all free (triangle mode).</summary>
    private static class TriangleDeck
    {
        public static readonly string[] AllStates = ["s1", "s2", "s3", "s4", "s5", "s6"];

        public static (string Deck, double[] Truth) Write(TempFolder folder, double[] energies, string[] observe, string start = "s6")
        {
            var rows = new List<string> { "from,to,rate" };
            var truth = new List<double>();
            for (var from = 2; from <= 6; from++)
            {
                for (var to = from - 1; to >= Math.Max(1, from - 2); to--)
                {
                    var rate = from - to == 1 ? 1.0 + (0.3 * from) : 0.4 + (0.1 * from);
                    truth.Add(rate);
                    // The deck starts a factor 1.5 (or 1/1.5) off the truth.
                    rows.Add(string.Create(CultureInfo.InvariantCulture, $"s{from},s{to},{rate * (truth.Count % 2 == 0 ? 1.5 : 1 / 1.5):R}"));
                }
            }

            File.WriteAllLines(folder.File("triangle-rates.csv"), rows);
            var times = Enumerable.Range(0, 60).Select(k => 0.02 * Math.Pow(1000, k / 59.0)).ToArray();
            SyntheticData.WriteTemplate(folder.File("triangle-data.csv"), times, observe);
            var path = folder.File("triangle.toml");
            File.WriteAllText(path, $"""
                format = 1
                title = "Six states with a measured downward triangle"
                [units]
                energy = "none"
                time = "s"
                [temperature]
                kT = 1.0
                [states]
                coordinates = [1, 2, 3, 4, 5, 6]
                labels = ["s1", "s2", "s3", "s4", "s5", "s6"]
                [energies]
                values = [{string.Join(", ", energies.Select(e => e.ToString(CultureInfo.InvariantCulture)))}]
                [weights]
                values = [1, 1, 1, 1, 1, 1]
                [transfer]
                kind = "one_way"
                direction = "toward_smaller"
                csv = "triangle-rates.csv"
                [initial]
                state = "{start}"
                [run]
                t_end = 20.0
                outputs = 10
                [fit]
                triangle = true
                [fit.data.dense]
                csv = "triangle-data.csv"
                """);
            return (path, [.. truth]);
        }
    }

    /// <summary>A six-level kernel deck (z exp(-(x - y)/alpha)) observed at two temperatures.</summary>
    private static class GlobalDeck
    {
        public static string Write(TempFolder folder, string name, string[] sets)
        {
            var times = Enumerable.Range(0, 30).Select(k => 0.02 * Math.Pow(500, k / 29.0)).ToArray();
            var data = new System.Text.StringBuilder();
            foreach (var set in sets)
            {
                var csv = $"{name}-{set}.csv";
                SyntheticData.WriteTemplate(folder.File(csv), times, ["e1", "e3", "e6"]);
                data.AppendLine(CultureInfo.InvariantCulture, $"[fit.data.{set}]\ncsv = \"{csv}\"\nset = [\"temperature.kT={(set == "cold" ? 0.4 : 1.5)}\"]");
            }

            var path = folder.File($"{name}.toml");
            File.WriteAllText(path, $"""
                format = 1
                title = "Six levels relaxing by an exponential-down kernel"
                [units]
                energy = "none"
                time = "s"
                [temperature]
                kT = 1.0
                [parameters]
                z = 1.0
                alpha = 1.0
                [states]
                spacing = "linear"
                count = 6
                from = 0.0
                to = 2.5
                label_prefix = "e"
                [energies]
                expression = "x"
                [weights]
                values = [1, 1, 1, 1, 1, 1]
                [transfer]
                kind = "kernel"
                direction = "toward_smaller"
                kernel = "z*exp(-(x - y)/alpha)"
                [initial]
                state = "e6"
                [run]
                t_end = 10.0
                outputs = 10
                [fit]
                starts = 4
                [fit.free]
                z = {"{"} log = true, lower = 0.1, upper = 20 {"}"}
                alpha = {"{"} log = true, lower = 0.1, upper = 5 {"}"}
                {data}
                """);
            return path;
        }
    }
}
