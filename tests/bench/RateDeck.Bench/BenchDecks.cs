using System.Globalization;
using System.Text;

namespace RateDeck.Bench;

/// <summary>
/// Writes the decks of the whole-process suites into a folder: a dense detailed-balance deck with
/// measured one-way rates for every pair (deck.toml, rates.csv and problem.json, which tells
/// tests/bench/reference_run.py the same problem), and a nearest-neighbour ladder model deck.
/// Every number is invented for the benchmark.
/// </summary>
public static class BenchDecks
{
    /// <summary>Energy of state i (x_i = i, 1-based) is this times x, in units of kT.</summary>
    public const double EnergySlope = 4.0;

    /// <summary>
    /// The dense deck of <paramref name="n"/> states: E_i = (4 / N) x_i with kT = 1 (pi spans
    /// e^4), unit weights, and a rate toward the smaller state for every pair,
    /// W(j -> i) = exp(-|j - i| / 50) (1 + 0.5 h(i, j)) with h a fixed hash in [0, 1);
    /// 100 linear outputs to t_end = 2 (beyond the slowest relaxation), all population starting in
    /// the top state. Rates are written with round-trip precision so that both readers get the same doubles.
    /// </summary>
    public static string WriteDense(string folder, int n)
    {
        Directory.CreateDirectory(folder);
        var csv = new StringBuilder(n * n * 16);
        csv.Append("from,to,rate\n");
        for (var from = 2; from <= n; from++)
        {
            for (var to = 1; to < from; to++)
            {
                var hash = ((from * 7919L) + (to * 104729L)) % 1000 / 1000.0;
                var rate = Math.Exp(-(from - to) / 50.0) * (1 + (0.5 * hash));
                csv.Append(CultureInfo.InvariantCulture, $"{from},{to},{rate:R}\n");
            }
        }

        File.WriteAllText(Path.Combine(folder, "rates.csv"), csv.ToString());
        var slope = (EnergySlope / n).ToString("R", CultureInfo.InvariantCulture);
        WriteLinearDeck(Path.Combine(folder, "deck.toml"), $"bench: dense detailed-balance deck, {n} states", n, slope, """
            kind = "one_way"
            direction = "toward_smaller"
            csv = "rates.csv"
            """, n, """
            t_end = 2.0
            outputs = 100
            """);
        File.WriteAllText(Path.Combine(folder, "problem.json"), $$"""
            {"n": {{n}}, "energy_slope": {{slope}}, "kT": 1.0, "t_end": 2.0, "outputs": 100, "initial_state": {{n}}}

            """);
        return Path.Combine(folder, "deck.toml");
    }

    /// <summary>
    /// A nearest-neighbour ladder of <paramref name="n"/> states (kernel with band 1), rate 1 toward
    /// the smaller state, E_i = 2 x_i / N (pi spans e^2), all population starting in the middle
    /// state, <paramref name="outputs"/> logarithmic outputs to t_end = N^2 / 4 (about the
    /// slowest relaxation time N^2 / pi^2 of a unit-rate walk, times 2.5).
    /// </summary>
    public static string WriteLadder(string folder, int n, int outputs)
    {
        Directory.CreateDirectory(folder);
        var slope = (2.0 / n).ToString("R", CultureInfo.InvariantCulture);
        var end = (n * (double)n / 4).ToString("R", CultureInfo.InvariantCulture);
        WriteLinearDeck(Path.Combine(folder, "ladder.toml"), $"bench: nearest-neighbour ladder, {n} states", n, slope, """
            kind = "kernel"
            direction = "toward_smaller"
            kernel = "1"
            band = 1
            """, n / 2, $"""
            t_end = {end}
            outputs = {outputs}
            spacing = "log"
            t_first = 1.0
            """);
        return Path.Combine(folder, "ladder.toml");
    }

    /// <summary>
    /// A dense energy-grain deck of <paramref name="n"/> grains (model units, kT = 1): grain energies
    /// 0.1 .. 50 kT, density of states x^3 (four oscillators), exponential-down collisions
    /// W(x -> y) = 1e9 exp(-(x - y) / 1.5) for every lower grain (10^9 down to about 10^-6 per
    /// time unit: the rates span 10^15), and a dissociation loss 1e6 ((x - 30) / x)^3 above 30 kT.
    /// All population starts in the lowest grain; 50 logarithmic outputs from 1e-12 to 1e4. The
    /// slowest mode (thermal dissociation) is far below eps rho, so the symmetric path in double
    /// cannot resolve it. Every number is invented for the benchmark.
    /// </summary>
    public static string WriteGrain(string folder, int n)
    {
        Directory.CreateDirectory(folder);
        var path = Path.Combine(folder, "grain.toml");
        File.WriteAllText(path, $$"""
            format = 1
            title = "bench: {{n}} energy grains, exponential-down collisions, dissociation above 30 kT"

            [units]
            energy = "none"
            time = "s"

            [temperature]
            kT = 1.0

            [states]
            spacing = "linear"
            count = {{n}}
            from = 0.1
            to = 50.0
            label_prefix = "g"

            [energies]
            expression = "x"

            [weights]
            expression = "x^3"

            [transfer]
            kind = "kernel"
            direction = "toward_smaller"
            kernel = "1e9 * exp(-(x - y) / 1.5)"

            [losses]
            expression = "1e6 * max(0, (x - 30) / x)^3"

            [initial]
            state = "g1"

            [run]
            t_end = 1.0e4
            spacing = "log"
            t_first = 1.0e-12
            outputs = 50

            """);
        return path;
    }

    /// <summary>
    /// A kernel deck of <paramref name="n"/> states for the start-up suite: E_i = 4 x_i / N,
    /// W(j -> i) = exp(-(x_j - x_i) / 3) toward the smaller state, the reverse completed by detailed
    /// balance, all population starting in the top state. Small enough that the work is negligible
    /// and what is timed is the program starting.
    /// </summary>
    public static string WriteKernel(string folder, int n)
    {
        Directory.CreateDirectory(folder);
        var slope = (EnergySlope / n).ToString("R", CultureInfo.InvariantCulture);
        return WriteLinearDeck(Path.Combine(folder, "kernel.toml"), $"bench: kernel deck, {n} states", n, slope, """
            kind = "kernel"
            direction = "toward_smaller"
            kernel = "exp(-(x - y) / 3)"
            """, n, """
            t_end = 2.0
            outputs = 20
            """);
    }

    /// <summary>Writes a deck on the linear grid of <see cref="LinearGrid"/> with the given [transfer] and [run] bodies and all population in state <paramref name="initialState"/>.</summary>
    private static string WriteLinearDeck(string path, string title, int n, string slope, string transfer, int initialState, string run)
    {
        File.WriteAllText(path, $"""
            format = 1
            title = "{title}"

            {LinearGrid(n, slope)}
            [transfer]
            {transfer}

            [initial]
            state = {initialState}

            [run]
            {run}

            """);
        return path;
    }

    /// <summary>The tables the generated decks share: model units, kT = 1, n linear states 1..n, E = slope x.</summary>
    private static string LinearGrid(int n, string slope) => $"""
        [units]
        energy = "none"
        time = "s"

        [temperature]
        kT = 1.0

        [states]
        spacing = "linear"
        count = {n}
        from = 1.0
        to = {n}.0

        [energies]
        expression = "{slope} * x"
        """;
}
