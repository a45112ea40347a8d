using System.Diagnostics;
using System.Globalization;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Propagation;

namespace RateDeck.Bench;

/// <summary>
/// The sparse path on nearest-neighbour ladders (<see cref="BenchDecks.WriteLadder"/>):
/// (1) whole process at the largest size, 50 outputs, under GNU time: <c>ratedeck run --exact-only
/// --no-plots</c>, <c>check</c> and <c>stiffness</c>, taken round-robin, each against the targets
/// (<see cref="TargetSeconds"/>, <see cref="TargetMegabytes"/>), with the load average beside them;
/// (2) in process, the stages of that run timed one by one (assembly, spectrum, slow modes, exact
/// propagation, steady state); (3) the cost of one explicit RK4 step at each size (about 0.5 s of
/// steps timed, median of the runs), which must grow like N; (4) at N = 2000, the largest
/// difference between the sparse exact path and the dense symmetric eigen path, as a check that
/// the timed path is right, and the extremes-only spectrum against the whole one.
/// </summary>
public static class LadderBench
{
    /// <summary>Wall-time target of each whole-process verb at 100,000 states (issue 9 §6).</summary>
    public const double TargetSeconds = 10;

    /// <summary>Peak-memory target of each whole-process verb at 100,000 states (issue 9 §6), MB = 10^6 bytes.</summary>
    public const double TargetMegabytes = 1000;

    /// <summary>Runs the suite; the largest of <paramref name="sizes"/> is the one run whole.</summary>
    public static void Run(IReadOnlyList<int> sizes, int runs, TextWriter output)
    {
        var algebra = LinearAlgebraProviders.Select(null, out var reason);
        output.WriteLine($"linear algebra: {reason}");
        var largest = sizes.Max();
        var folder = Path.Combine(Path.GetTempPath(), $"ratedeck-bench-ladder-{largest}");
        var deck = BenchDecks.WriteLadder(folder, largest, outputs: 50);
        var cli = Repository.Cli();
        var verbs = new (string Label, string[] Arguments)[]
        {
            ("run --exact-only --no-plots", ["run", deck, "--exact-only", "--no-plots", "--out", Path.Combine(folder, "out")]),
            ("check", ["check", deck]),
            ("stiffness", ["stiffness", deck]),
        };
        foreach (var (_, arguments) in verbs)
        {
            ProcessRun.Measure(cli, arguments);
        }

        var samples = verbs.Select(_ => new List<ProcessMeasure>()).ToArray();
        var loads = new List<string>();
        for (var r = 0; r < runs; r++)
        {
            loads.Add(LoadAverage());
            for (var v = 0; v < verbs.Length; v++)
            {
                samples[v].Add(ProcessRun.Measure(cli, verbs[v].Arguments));
            }
        }

        loads.Add(LoadAverage());
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"whole process, N = {largest}, 50 outputs, {runs} run(s) round-robin; load average (1, 5, 15 min) {string.Join(" .. ", loads.Distinct())}"));
        for (var v = 0; v < verbs.Length; v++)
        {
            var wall = Timing.Median([.. samples[v].Select(m => m.Seconds)]);
            var peak = samples[v].Max(m => m.PeakMegabytes);
            var met = wall < TargetSeconds && peak < TargetMegabytes ? "met" : "NOT met";
            output.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"  {verbs[v].Label,-28} wall median {wall:F2} s (min {samples[v].Min(m => m.Seconds):F2}), processor {Timing.Median([.. samples[v].Select(m => m.ProcessorSeconds)]):F2} s, peak RSS {peak:F0} MB; target under {TargetSeconds} s and {TargetMegabytes} MB: {met}"));
        }

        Stages(deck, largest, algebra, output);

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

    /// <summary>The stages of the run of <paramref name="deck"/> (<paramref name="size"/> states) in process, one by one: wall and processor seconds each.</summary>
    public static void Stages(string deck, int size, ILinearAlgebra algebra, TextWriter output)
    {
        // Wall and processor seconds per stage: under load the processor time is the steadier figure.
        var stages = new List<string>();
        T Stage<T>(string name, Func<T> work)
        {
            var (clock, processor) = (Stopwatch.StartNew(), Process.GetCurrentProcess().TotalProcessorTime);
            var result = work();
            stages.Add(string.Create(CultureInfo.InvariantCulture, $"{name} {clock.Elapsed.TotalSeconds:F2} s (processor {(Process.GetCurrentProcess().TotalProcessorTime - processor).TotalSeconds:F2} s)"));
            return result;
        }

        var loaded = Stage("assembly", () => DeckPipeline.Load(deck, [], algebra));
        var spectrum = Stage("spectrum", () => Spectrum.Compute(loaded.Rates, algebra));
        var slowest = Stage("slow modes", () => spectrum.SlowestRate);
        var initial = new double[size];
        initial[(size / 2) - 1] = 1.0;
        var times = Enumerable.Range(0, 50).Select(k => Math.Pow(size * (double)size / 4, k / 49.0)).ToArray();
        var exact = ExactPropagatorChoice.Choose(loaded.Rates, algebra, initial: initial, spectrum: spectrum);
        var trajectory = Stage("exact propagation to 50 times", () => exact.Propagate(initial, times));
        var steady = Stage("steady state", () => SteadyState.Compute(loaded.Rates, spectrum, initial, algebra));
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"in process, N = {size}: {string.Join("; ", stages)}"));
        output.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"  storage: {loaded.Rates.StorageReason}; spectrum: {spectrum.Coverage ?? "every eigenvalue"}; slowest rate {slowest:R}, spectral radius {spectrum.SpectralRadius:R}; exact path {exact.Name}; steady state {steady.Kind}; total population at the end {trajectory.Populations[^1].Sum():R}"));
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
        var balance = DetailedBalance.Analyze(rates);
        var whole = Spectrum.Compute(rates, algebra, balance, SpectrumExtent.Full);
        var extremes = Spectrum.Compute(rates, algebra, balance, SpectrumExtent.Extremes);
        output.WriteLine(string.Create(CultureInfo.InvariantCulture,
            $"check, N = {n}: extremes only against every eigenvalue: spectral radius {extremes.SpectralRadius:R} vs {whole.SpectralRadius:R}, slowest rate {extremes.SlowestRate:R} vs {whole.SlowestRate:R}"));
    }

    /// <summary>The load average line of /proc/loadavg (1, 5 and 15 minutes), for the figures' context.</summary>
    private static string LoadAverage() => File.Exists("/proc/loadavg") ? string.Join(' ', File.ReadAllText("/proc/loadavg").Split(' ').Take(3)) : "unknown";
}
