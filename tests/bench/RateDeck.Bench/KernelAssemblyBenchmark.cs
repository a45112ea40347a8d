using System.Diagnostics;
using System.Globalization;
using RateDeck.Decks;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Bench;

/// <summary>
/// Assembles the generator of an N-state kernel deck (read from deck text by the real reader)
/// through <see cref="RateMatrixAssembler"/>: N^2 pairs visited, the N (N - 1) / 2 pairs in the
/// declared direction evaluated and completed by detailed balance, then the diagonal.
/// Target (model-deck issue): N = 2000 under half a second. One warm-up, then the median of five.
/// </summary>
internal static class KernelAssemblyBenchmark
{
    private const int _repeats = 5;

    public static void Run(int n)
    {
        var deck = DeckReader.Parse(DeckText(n), "bench-kernel.toml", Directory.GetCurrentDirectory(), []);
        var states = StateSpaceBuilder.Build(deck);
        var evaluations = (long)n * (n - 1) / 2;
        Console.WriteLine($"kernel assembly, N = {n}: {(long)n * n:N0} pairs visited, {evaluations:N0} kernel evaluations and as many completions");

        var checksum = Checksum(RateMatrixAssembler.Assemble(deck, states));
        var wall = new double[_repeats];
        var cpu = new double[_repeats];
        var process = Process.GetCurrentProcess();
        for (var k = 0; k < _repeats; k++)
        {
            // Processor time beside wall time: on a shared machine the wall clock also counts the
            // time other processes held the cores.
            process.Refresh();
            var cpuBefore = process.TotalProcessorTime;
            var clock = Stopwatch.StartNew();
            var rates = RateMatrixAssembler.Assemble(deck, states);
            clock.Stop();
            process.Refresh();
            wall[k] = clock.Elapsed.TotalMilliseconds;
            cpu[k] = (process.TotalProcessorTime - cpuBefore).TotalMilliseconds;
            if (Checksum(rates) != checksum)
            {
                throw new InvalidOperationException("the assembled generator changed between runs");
            }
        }

        Console.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"  median of {_repeats}: wall {Timing.Median(wall),7:F1} ms, cpu {Timing.Median(cpu),7:F1} ms ({Timing.Median(cpu) * 1e6 / evaluations:F1} ns per evaluated pair)"));
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  runs (wall ms): {string.Join(", ", wall.Select(w => w.ToString("F1", CultureInfo.InvariantCulture)))}; checksum {checksum:G6}"));
    }

    /// <summary>
    /// An energy ladder 0..20 kT with weights growing like a density of states and an
    /// exponential-down kernel with a soft gap factor; every pair is coupled (no band).
    /// </summary>
    private static string DeckText(int n) => string.Create(CultureInfo.InvariantCulture, $"""
        format = 1
        title = "kernel assembly benchmark"
        [temperature]
        kT = 1.0
        [parameters]
        c0 = 2.0
        w = 1.5
        gap = 0.3
        [states]
        spacing = "linear"
        count = {n}
        from = 0.0
        to = 20.0
        [energies]
        expression = "x"
        [weights]
        expression = "sqrt(1 + x)"
        [transfer]
        kind = "kernel"
        direction = "toward_smaller"
        kernel = "c0*exp(-(x - y)/w)*(1 - exp(-(x - y)/gap))"
        [run]
        t_end = 1.0
        """);

    private static double Checksum(RateMatrix rates) => rates.Generator.Values.Sum();
}
