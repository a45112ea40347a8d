using System.Diagnostics;
using System.Globalization;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Propagation;

namespace RateDeck.Bench;

/// <summary>
/// The sparse path on nearest-neighbour ladders (<see cref="BenchDecks.WriteLadder"/>):
/// (1) whole-process <c>ratedeck run --exact-only --no-plots</c> at the largest size, 50 outputs,
/// under GNU time; (2) in process, the stages of that run timed one by one (assembly, spectrum,
/// exact propagation); (3) the cost of one explicit RK4 step at each size (about 0.5 s of steps
/// timed, median of the runs), which must grow like N; (4) at N = 2000, the largest difference between
/// the sparse exact path and the dense symmetric eigen path, as a check that the timed path is right.
/// </summary>
public static class LadderBench
{
    /// <summary>Runs the suite; the largest of <paramref name="sizes"/> is the one run whole.</summary>
    public static void Run(IReadOnlyList<int> sizes, int runs, TextWriter output)
    {
        var algebra = LinearAlgebraProviders.Select(null, out var reason);
        output.WriteLine($"linear algebra: {reason}");
        var largest = sizes.Max();
        var folder = Path.Combine(Path.GetTempPath(), $"ratedeck-bench-ladder-{largest}");
        var deck = BenchDecks.WriteLadder(folder, largest, outputs: 50);
        var cli = Repository.Cli();
        ProcessRun.Measure(cli, ["run", deck, "--exact-only", "--no-plots", "--out", Path.Combine(folder, "out")]);
        var whole = Enumerable.Range(0, runs).Select(_ => ProcessRun.Measure(cli, ["run", deck, "--exact-only", "--no-plots", "--out", Path.Combine(folder, "out")])).ToArray();
        output.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"whole process, N = {largest}, 50 outputs: wall median {Timing.Median([.. whole.Select(w => w.Seconds)]):F2} s (min {whole.Min(w => w.Seconds):F2}), peak RSS median {Timing.Median([.. whole.Select(w => w.PeakMegabytes)]):F0} MB"));

        var clock = Stopwatch.StartNew();
        var loaded = DeckPipeline.Load(deck, [], algebra);
        var assembly = clock.Elapsed.TotalSeconds;
        clock.Restart();
        var spectrum = Spectrum.Compute(loaded.Rates, algebra);
        var spectral = clock.Elapsed.TotalSeconds;
        var initial = new double[largest];
        initial[(largest / 2) - 1] = 1.0;
        var times = Enumerable.Range(0, 50).Select(k => Math.Pow(largest * (double)largest / 4, k / 49.0)).ToArray();
        clock.Restart();
        var exact = ExactPropagatorChoice.Choose(loaded.Rates, algebra, initial: initial, spectrum: spectrum);
        var trajectory = exact.Propagate(initial, times);
        var propagation = clock.Elapsed.TotalSeconds;
        output.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"in process, N = {largest}: assembly {assembly:F2} s ({loaded.Rates.StorageReason}); spectrum {spectral:F2} s ({spectrum.PathReason}); exact propagation to 50 times {propagation:F2} s ({exact.Name}); total population at the end {trajectory.Populations[^1].Sum():R}"));

        output.WriteLine();
        output.WriteLine($"{"N",6}  {"RK4 step us (median)",20}  {"min",8}  {"us per state",12}");
        foreach (var n in sizes)
        {
            var rates = DeckPipeline.Load(BenchDecks.WriteLadder(Path.Combine(Path.GetTempPath(), $"ratedeck-bench-ladder-{n}"), n, 50), [], algebra).Rates;
            // About 0.5 s of stepping per timed run at every size (1000 steps at the least).
            var steps = Math.Max(1000, 200_000_000 / (40 * n));
            var rk4 = new RungeKutta4Propagator(rates, 0.1);
            // Every state populated: the products skip columns whose population is zero, and a
            // start in one state would leave most of a large ladder untouched within the timed steps.
            var start = Enumerable.Repeat(1.0 / n, n).ToArray();
            double[] end = [steps * 0.1];
            var seconds = Timing.Measure([() => rk4.Propagate(start, end)], warmups: 1, runs)[0];
            var perStep = seconds.Select(s => s / steps * 1e6).ToArray();
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{n,6}  {Timing.Median(perStep),20:F1}  {perStep.Min(),8:F1}  {Timing.Median(perStep) / n * 1e3,12:F3} ns"));
        }

        output.WriteLine();
        CrossCheck(2000, algebra, output);
    }

    private static void CrossCheck(int n, ILinearAlgebra algebra, TextWriter output)
    {
        var rates = DeckPipeline.Load(BenchDecks.WriteLadder(Path.Combine(Path.GetTempPath(), $"ratedeck-bench-ladder-{n}"), n, 50), [], algebra).Rates;
        var initial = new double[n];
        initial[(n / 2) - 1] = 1.0;
        var times = Enumerable.Range(0, 50).Select(k => Math.Pow(n * (double)n / 4, k / 49.0)).ToArray();
        var sparse = new ContourExponentialPropagator(rates).Propagate(initial, times);
        var dense = new SymmetricEigenPropagator(rates, algebra).Propagate(initial, times);
        var worst = sparse.Populations.Zip(dense.Populations, (a, b) => a.Zip(b, (u, v) => Math.Abs(u - v)).Max()).Max();
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"check, N = {n}: max |contour - dense symmetric eigen| over 50 log-spaced times to N^2/4 = {worst:G3}"));
    }
}
