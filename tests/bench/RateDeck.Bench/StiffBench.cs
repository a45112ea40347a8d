using System.Globalization;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Propagation;

namespace RateDeck.Bench;

/// <summary>
/// Stiff decks (docs/stiff-decks.md): the whole process of <c>ratedeck run</c> on the six-state
/// demo deck, and on a dense energy-grain deck of N states (rates spanning 10^15) exact to 50
/// output times; then, in process, the cost of each exact path against the plain symmetric eigen
/// path in double on the same decks (the plain path is timed only for comparison: on these decks
/// its slow modes are wrong).
/// </summary>
public static class StiffBench
{
    /// <summary>Runs the suite: whole-process runs (median of <paramref name="runs"/>), then the paths in process.</summary>
    public static void Run(int[] sizes, int runs, TextWriter output)
    {
        var cli = Repository.Cli();
        var six = Path.Combine(Repository.Root, "decks", "stiff-six.toml");
        var outFolder = Path.Combine(Path.GetTempPath(), "ratedeck-bench-stiff-out");
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"whole process (ratedeck run --no-plots), median of {runs}, wall seconds (min, max):"));
        WholeProcess(output, cli, "stiff-six (6 states, default run)", [six, "--no-plots", "--out", outFolder], runs);
        foreach (var n in sizes)
        {
            var grain = BenchDecks.WriteGrain(Path.Combine(Path.GetTempPath(), $"ratedeck-bench-grain-{n}"), n);
            WholeProcess(output, cli, $"grain-{n} (dense, exact to 50 times)", [grain, "--no-plots", "--exact-only", "--out", outFolder], runs);
        }

        output.WriteLine();
        output.WriteLine("exact paths in process (decomposition or factorizations + all output times), median of the runs, seconds:");
        var algebra = LinearAlgebraProviders.Select(null, out _);
        Paths(output, "stiff-six", DeckPipeline.Load(six, [], algebra), runs);
        foreach (var n in sizes)
        {
            var grain = Path.Combine(Path.GetTempPath(), $"ratedeck-bench-grain-{n}", "grain.toml");
            Paths(output, $"grain-{n}", DeckPipeline.Load(grain, [], algebra), runs);
        }

        output.WriteLine();
        RunSlowRates(sizes, runs, output);
    }

    /// <summary>
    /// The slowest rates of the dense grain decks of <paramref name="sizes"/> states, in process: the
    /// plain symmetric eigen-decomposition of S in double against the slow-mode iteration, median of
    /// <paramref name="runs"/>.
    /// </summary>
    public static void RunSlowRates(int[] sizes, int runs, TextWriter output)
    {
        var algebra = LinearAlgebraProviders.Select(null, out _);
        output.WriteLine($"slowest rates in process (provider {algebra.Name}): the plain symmetric eigen-decomposition of S in double against the slow-mode iteration, median of {runs}, seconds:");
        foreach (var n in sizes)
        {
            var grain = BenchDecks.WriteGrain(Path.Combine(Path.GetTempPath(), $"ratedeck-bench-grain-{n}"), n);
            SlowRates(output, $"grain-{n}", DeckPipeline.Load(grain, [], algebra), runs);
        }
    }

    /// <summary>
    /// The cost of the slow-mode iteration (<see cref="SlowModes"/>: block factorization and
    /// inverse subspace iteration) against the plain symmetric path's decomposition on the same deck,
    /// with what each says the slowest rate is.
    /// </summary>
    private static void SlowRates(TextWriter output, string label, LoadedDeck loaded, int runs)
    {
        var rates = loaded.Rates;
        var seconds = Timing.Measure(
            [
                () => loaded.Algebra.SymmetricEigenOverwriting(Rates.SymmetrizedGenerator.Build(rates)),
                () => SlowModes.Compute(rates, balanced: true),
            ], warmups: 1, runs);
        var plain = Timing.Median(seconds[0]);
        var spectrum = Spectrum.Compute(rates, loaded.Algebra);
        var slow = SlowModes.Compute(rates, balanced: true);
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {label,-10} {"symmetric (double, plain)",-28} {plain,9:F4}  {spectrum.Unresolved ?? "resolves the slow modes"}"));
        var median = Timing.Median(seconds[1]);
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {label,-10} {"slow-mode iteration",-28} {median,9:F4}  ({median / plain,5:F2} x plain) slowest rate {slow.SlowestRate?.ToString("G10", CultureInfo.InvariantCulture) ?? slow.Failure}; {slow.Description}"));
    }

    private static void WholeProcess(TextWriter output, string cli, string label, string[] arguments, int runs)
    {
        var seconds = Enumerable.Range(0, runs).Select(_ => ProcessRun.Measure(cli, ["run", .. arguments]).Seconds).ToArray();
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {label,-40} {Timing.Median(seconds),8:F3}  ({seconds.Min():F3}, {seconds.Max():F3})"));
    }

    private static void Paths(TextWriter output, string label, LoadedDeck loaded, int runs)
    {
        var rates = loaded.Rates;
        var initial = RunSetup.InitialPopulations(loaded.Deck, loaded.States);
        var times = RunSetup.OutputTimes(loaded.Deck.Run);
        var contenders = new List<(string Name, Action Work)>
        {
            ("symmetric (double, plain)", () => new SymmetricEigenPropagator(rates, loaded.Algebra).Propagate(initial, times)),
            ("implicit sdirk4", () => new ImplicitSdirkPropagator(rates).Propagate(initial, times)),
        };
        if (rates.Count <= Spectrum.ExtendedPrecisionStateLimit)
        {
            contenders.Insert(1, ("extended (double-double)", () =>
            {
                var decomposition = ExtendedSymmetricEigen.Decompose(rates.Count, Rates.SymmetrizedGenerator.BuildExtended(rates));
                new ExtendedEigenPropagator(rates, decomposition, 0).Propagate(initial, times);
            }
            ));
        }

        var seconds = Timing.Measure([.. contenders.Select(c => c.Work)], warmups: 1, runs);
        var plain = Timing.Median(seconds[0]);
        var implicitPropagator = new ImplicitSdirkPropagator(rates);
        implicitPropagator.Propagate(initial, times);
        for (var c = 0; c < contenders.Count; c++)
        {
            var median = Timing.Median(seconds[c]);
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {label,-10} {contenders[c].Name,-28} {median,9:F4}  ({median / plain,7:F1} x plain)"));
        }

        output.WriteLine($"  {label,-10} implicit: {implicitPropagator.Statistics}");
    }
}
