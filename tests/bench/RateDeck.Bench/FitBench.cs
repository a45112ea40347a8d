using System.Diagnostics;
using System.Globalization;
using RateDeck.Fitting;
using RateDeck.LinearAlgebra;

namespace RateDeck.Bench;

/// <summary>
/// Whole fits in process (issue 11's speed targets): kT of the cascade demo (48 states, the deck's 60
/// output times after t = 0, five shells observed, synthetic data made by the model at the deck's kT = 1
/// with seeded Gaussian noise of 0.1 % of each value)
/// from a start a factor 2 off (kT = 2), and NIST StRD Lanczos3 from NIST's start 1. Each fit is
/// timed with the derivatives the fitter chooses (analytic where they apply) and with central
/// differences forced (<c>derivatives = "differences"</c>); the counts of trajectory evaluations
/// (exact propagations) and of Jacobians are printed beside the times, and the processor time per
/// fit (over the warm-ups too; run with OPENBLAS_NUM_THREADS=1 so that idle BLAS threads add none),
/// which a loaded machine inflates less than the wall time. Targets: 0.1 s each.
/// </summary>
internal static class FitBench
{
    private static readonly string[] _observed = ["k1", "k12", "k24", "k36", "k48"];

    public static void Run(int runs, TextWriter output)
    {
        var algebra = LinearAlgebraProviders.Select(null, out var algebraReason);
        output.WriteLine($"whole fits in process; linear algebra: {algebraReason}");
        output.WriteLine("fit                         derivatives   wall ms, median (min .. max)   cpu ms/fit  iterations  jacobians  trajectories  converged");
        var folder = Directory.CreateTempSubdirectory("ratedeck-fitbench-");
        try
        {
            var cascade = WriteCascadeFit(folder.FullName, algebra);
            var lanczos = Path.Combine(Repository.Root, "tests", "reference", "fixtures", "nist", "lanczos3.toml");
            foreach (var (name, deck) in new[] { ("cascade kT from 2 (truth 1)", cascade), ("NIST Lanczos3, start 1", lanczos) })
            {
                foreach (var mode in new[] { "auto", "differences" })
                {
                    string[] overrides = [$"fit.derivatives={mode}"];
                    FitOutcome? last = null;
                    var cpu = TimeSpan.Zero;
                    var seconds = Timing.Measure([() =>
                    {
                        var before = Process.GetCurrentProcess().TotalProcessorTime;
                        last = Fitter.Fit(deck, overrides, algebra, new FitOptions());
                        cpu += Process.GetCurrentProcess().TotalProcessorTime - before;
                    }], warmups: 5, runs)[0];
                    var cpuPerFit = cpu.TotalMilliseconds / (runs + 5);
                    var report = last!.Report;
                    output.WriteLine(string.Create(
                        CultureInfo.InvariantCulture,
                        $"{name,-27} {mode,-13} {Timing.Median(seconds) * 1e3,8:F1} ({seconds.Min() * 1e3:F1} .. {seconds.Max() * 1e3:F1}){"",4} {cpuPerFit,10:F1} {report.Best.Iterations,10}  {report.Best.JacobianEvaluations,9}  {last.Problem.TrajectoryEvaluations,12}  {report.Converged} {report.Best.Stop} rss {report.Rss:G3} ({string.Join(", ", report.Parameters.Select(p => $"{p.Name} = {p.Value:G10}"))})"));
                }
            }
        }
        finally
        {
            folder.Delete(recursive: true);
        }
    }

    /// <summary>The cascade demo with a [fit] table for kT (start 2) and a data file made by the model at kT = 1 with 0.1 % noise.</summary>
    private static string WriteCascadeFit(string folder, ILinearAlgebra algebra)
    {
        var decks = Path.Combine(Repository.Root, "decks");
        File.Copy(Path.Combine(decks, "cascade-rates.csv"), Path.Combine(folder, "cascade-rates.csv"));
        var deck = Path.Combine(folder, "cascade-fit.toml");
        File.WriteAllText(deck, File.ReadAllText(Path.Combine(decks, "cascade.toml")) + """

            [fit.free]
            kT = { start = 2.0, log = true }

            [fit.data.synthetic]
            csv = "cascade-data.csv"
            """);
        var times = RateDeck.Pipeline.RunSetup.OutputTimes(RateDeck.Decks.DeckReader.Read(deck, []).Run)[1..];
        var data = Path.Combine(folder, "cascade-data.csv");
        string Row(double t, IEnumerable<double> values) => string.Join(',', values.Prepend(t).Select(v => v.ToString("R", CultureInfo.InvariantCulture)));
        File.WriteAllLines(data, times.Select(t => Row(t, _observed.Select(_ => 0.0))).Prepend("t," + string.Join(',', _observed)));
        var (_, _, problem) = Fitter.Prepare(deck, [], algebra);
        var truth = problem.Predict([1.0]);
        var random = new Random(11);
        var noisy = truth.Select(y => y * (1 + (1e-3 * Gaussian(random)))).ToArray();
        File.WriteAllLines(data, times.Select((t, row) => Row(t, _observed.Select((_, column) => noisy[(column * times.Length) + row]))).Prepend("t," + string.Join(',', _observed)));
        return deck;
    }

    /// <summary>A standard normal draw (Box-Muller).</summary>
    private static double Gaussian(Random random) => Math.Sqrt(-2 * Math.Log(1 - random.NextDouble())) * Math.Cos(2 * Math.PI * random.NextDouble());
}
