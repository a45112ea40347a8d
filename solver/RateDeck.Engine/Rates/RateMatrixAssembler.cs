using System.Globalization;
using System.Runtime.CompilerServices;
using RateDeck.Decks;
using RateDeck.States;

namespace RateDeck.Rates;

/// <summary>
/// Deck + <see cref="StateSpace"/> -> <see cref="RateMatrix"/> (SPEC 2). Off-diagonal rates come
/// from the deck's coupling: measured one way and completed by detailed balance, measured in full
/// and taken as given, or a model kernel evaluated for every pair in the declared direction and
/// completed. The diagonal is K_jj = -sum_{i != j} K_ij - loss_j.
/// </summary>
/// <remarks>
/// Tolerances. A completed rate K_ji = exp(ln K_ij + ln pi_j - ln pi_i) carries a relative error of
/// about |ln K_ji| x 1.1e-16 (below 1e-13 for any normal double), so K_ij pi_j = K_ji pi_i holds to
/// better than 1e-12 relative for every pair with both rates non-zero. A completed rate below the
/// smallest normal double (2.2e-308) is set to exactly zero: as a subnormal it would keep too few
/// digits to satisfy detailed balance at that tolerance, and zero is what the symmetrised
/// generator expects of an underflowed partner. Each diagonal is one rounding of a compensated
/// (Neumaier) sum, so each column sums to minus its loss within a few units in the last place of
/// the diagonal. Rate entries name states by zero-based grid index.
/// </remarks>
public static class RateMatrixAssembler
{
    private const double _smallestNormal = 2.2250738585072014e-308;

    /// <summary>The variables of a kernel expression, in evaluation order (kT and the parameters follow them in the scope).</summary>
    internal static readonly string[] KernelVariables = ["x", "y", "i", "j"];

    /// <summary>
    /// Assembles the generator of <paramref name="deck"/> on <paramref name="states"/> (built from
    /// the same deck). Throws <see cref="DeckException"/> at the offending entry or kernel for a
    /// negative or non-finite rate, a rate against the declared direction, a repeated pair, or a
    /// completed rate that would overflow a double.
    /// </summary>
    public static RateMatrix Assemble(Deck deck, StateSpace states)
    {
        if (states.Count != deck.Grid.Count)
        {
            throw new ArgumentException($"the state space has {states.Count} states but the deck's grid has {deck.Grid.Count}", nameof(states));
        }

        var n = states.Count;
        var (generator, storage) = GeneratorBuilder.For(deck.Coupling, n);
        var origin = deck.Coupling switch
        {
            MeasuredOneWay oneWay => PlaceOneWay(oneWay, states, generator, deck.RateConversion),
            MeasuredFull full => PlaceFull(full, states, generator, deck.RateConversion),
            KernelModel kernel => PlaceKernel(kernel, deck, states, generator),
            _ => throw new NotSupportedException($"unknown coupling {deck.Coupling.GetType().Name}"),
        };

        var loss = deck.Losses is null
            ? new double[n]
            : Converted(PerStateEvaluator.Evaluate(deck, deck.Losses, "loss rate", PerStateRequirement.NonNegative), deck.RateConversion);
        var pumping = deck.Pumping is null
            ? new double[n]
            : Converted(PerStateEvaluator.Evaluate(deck, deck.Pumping, "pumping rate", PerStateRequirement.NonNegative), deck.RateConversion);

        FillDiagonal(generator, loss, states, deck.Coupling.Span);
        return generator.Build(states, loss, pumping, origin, storage, deck.TimeUnit);
    }

    /// <summary>Rates per the deck's given time unit as rates per its output unit (in place).</summary>
    private static double[] Converted(double[] rates, RateConversion conversion)
    {
        if (conversion.Changes)
        {
            for (var k = 0; k < rates.Length; k++)
            {
                rates[k] = conversion.Apply(rates[k]);
            }
        }

        return rates;
    }

    /// <remarks>
    /// The hot loop of a measured deck (N^2 / 2 rows for a dense one): it reads the rows' columns
    /// (<see cref="RateEntryTable.Columns"/>) and makes a row's <see cref="RateEntry"/> only to locate
    /// an error. It runs once per process, so it is compiled optimised at once rather than in tiers.
    /// </remarks>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static BalanceOrigin PlaceOneWay(MeasuredOneWay oneWay, StateSpace states, GeneratorBuilder generator, RateConversion conversion)
    {
        var seen = new PairSet(states.Count);
        var entries = oneWay.Entries;
        var (from, to, rate, count) = RateEntryTable.Columns(entries);
        for (var k = 0; k < count; k++)
        {
            CheckEntry(entries, k, from[k], to[k], rate[k], states, seen);
            var pair = new Pair(from[k], to[k], states);
            RequireDistinctCoordinates(pair.From, pair.To, states, entries, k);
            if (!pair.Follows(oneWay.Direction))
            {
                throw new DeckException(
                    entries[k].Span,
                    $"this rate goes from {pair.Describe()}, against the declared direction ({Describe(oneWay.Direction)}); give it the other way round, or give the full matrix");
            }

            if (!TryPlaceAndComplete(generator, pair.From, pair.To, conversion.Apply(rate[k]), pair.LogRatio))
            {
                throw new DeckException(entries[k].Span, OverflowMessage("this rate", pair, rate[k]));
            }
        }

        return BalanceOrigin.CompletedByDetailedBalance;
    }

    private static BalanceOrigin PlaceFull(MeasuredFull full, StateSpace states, GeneratorBuilder generator, RateConversion conversion)
    {
        var seen = new PairSet(states.Count);
        var (from, to, rate, count) = RateEntryTable.Columns(full.Entries);
        for (var k = 0; k < count; k++)
        {
            CheckEntry(full.Entries, k, from[k], to[k], rate[k], states, seen);
            generator.Set(to[k], from[k], conversion.Apply(rate[k]));
        }

        return BalanceOrigin.TakenAsGiven;
    }

    /// <summary>
    /// W(x -> y) with x, y the source and target coordinates and i, j their ONE-based state
    /// numbers, evaluated once for every pair in the declared direction within the band. kT and
    /// the deck parameters are run-time inputs of the once-compiled kernel.
    /// </summary>
    /// <remarks>
    /// The hot loop of a model deck (N^2 pairs for N in the thousands): it reads the coordinates
    /// and ln pi from arrays, reuses one value buffer, writes the storage through one call per rate and
    /// builds a <see cref="Pair"/> only to word an error.
    /// </remarks>
    private static BalanceOrigin PlaceKernel(KernelModel kernel, Deck deck, StateSpace states, GeneratorBuilder generator)
    {
        if (kernel.Band is < 1)
        {
            throw new DeckException(kernel.Span, $"the band is {kernel.Band}; it must be 1 (nearest neighbours) or more");
        }

        var scope = ExpressionScope.Create(deck, KernelVariables);
        var compiled = scope.Compile(kernel.Text, kernel.Span);
        var values = scope.NewValues();
        var n = states.Count;
        var band = kernel.Band ?? n;
        var coordinates = states.Coordinates;
        var logPi = states.LogEquilibrium;
        var towardSmaller = kernel.Direction == TransferDirection.TowardSmaller;
        var conversion = deck.RateConversion;
        for (var source = 0; source < n; source++)
        {
            var x = coordinates[source];
            values[0] = x;
            values[2] = source + 1;
            var first = Math.Max(0, source - band);
            var last = Math.Min(n - 1, source + band);
            for (var target = first; target <= last; target++)
            {
                var y = coordinates[target];
                if (target == source || (towardSmaller ? !(y < x) : !(y > x)))
                {
                    RequireDistinctCoordinates(source, target, states, kernel.Span);
                    continue;
                }

                values[1] = y;
                values[3] = target + 1;
                var rate = compiled.Evaluate(values);
                if (!(rate >= 0 && double.IsFinite(rate)))
                {
                    throw new DeckException(
                        kernel.Span,
                        string.Create(CultureInfo.InvariantCulture, $"the kernel is {rate} from {new Pair(source, target, states).Describe()}; a rate must be finite and zero or more"));
                }

                if (!TryPlaceAndComplete(generator, source, target, conversion.Apply(rate), logPi[source] - logPi[target]))
                {
                    var pair = new Pair(source, target, states);
                    throw new DeckException(kernel.Span, OverflowMessage($"the kernel's rate from {pair.Describe()}", pair, rate));
                }
            }
        }

        return BalanceOrigin.CompletedByDetailedBalance;
    }

    /// <summary>
    /// d W(x -> y) / d(<paramref name="input"/>) (kT or a parameter) for the zero-based states
    /// from, to at coordinates x, y: 0 beyond the band, where the kernel is not evaluated; null when
    /// the kernel does not read the input.
    /// </summary>
    /// <exception cref="NotSupportedException">The input reaches a function without a derivative rule.</exception>
    internal static Func<double, double, int, int, double>? KernelDerivative(KernelModel kernel, Deck deck, string input)
    {
        var scope = ExpressionScope.Create(deck, KernelVariables);
        if (!scope.InputsRead(scope.Compile(kernel.Text, kernel.Span)).Contains(input))
        {
            return null;
        }

        var derivative = scope.CompileDerivative(kernel.Text, kernel.Span, input);
        var values = scope.NewValues();
        var band = kernel.Band ?? int.MaxValue;
        return (x, y, from, to) =>
        {
            if (Math.Abs(from - to) > band)
            {
                return 0;
            }

            values[0] = x;
            values[1] = y;
            values[2] = from + 1;
            values[3] = to + 1;
            return derivative.Evaluate(values);
        };
    }

    /// <summary>Validates row <paramref name="k"/> of <paramref name="entries"/> (from, to, rate); <paramref name="seen"/> marks pairs already given.</summary>
    private static void CheckEntry(IReadOnlyList<RateEntry> entries, int k, int from, int to, double rate, StateSpace states, PairSet seen)
    {
        var n = states.Count;
        if (from < 0 || from >= n || to < 0 || to >= n)
        {
            throw new DeckException(entries[k].Span, $"this rate names states {from + 1} -> {to + 1}, but the grid has states 1..{n}");
        }

        if (from == to)
        {
            throw new DeckException(entries[k].Span, $"this rate goes from state '{states.Labels[from]}' to itself; the diagonal is built from the other rates and the losses, so leave it out");
        }

        if (!(rate >= 0 && double.IsFinite(rate)))
        {
            throw new DeckException(entries[k].Span, string.Create(CultureInfo.InvariantCulture, $"the rate from {new Pair(from, to, states).Describe()} is {rate}; a rate must be finite and zero or more"));
        }

        if (!seen.Add(from, to))
        {
            throw new DeckException(entries[k].Span, $"the rate from {new Pair(from, to, states).Describe()} is given twice; keep one");
        }
    }

    /// <summary>
    /// Sets K[to, from] = rate and completes K[from, to] = rate pi_from / pi_to as
    /// exp(ln rate + <paramref name="logRatio"/>), <paramref name="logRatio"/> = ln pi_from - ln pi_to,
    /// in <paramref name="generator"/>; false (nothing completed)
    /// when the completed rate would overflow a double.
    /// </summary>
    private static bool TryPlaceAndComplete(GeneratorBuilder generator, int from, int to, double rate, double logRatio)
    {
        generator.Set(to, from, rate);
        if (rate == 0)
        {
            return true;
        }

        var reverse = Math.Exp(Math.Log(rate) + logRatio);
        if (double.IsInfinity(reverse))
        {
            return false;
        }

        generator.Set(from, to, reverse >= _smallestNormal ? reverse : 0.0);
        return true;
    }

    private static string OverflowMessage(string what, Pair pair, double rate) => string.Create(
        CultureInfo.InvariantCulture,
        $"completing {what} by detailed balance gives the reverse rate {rate:G6} x pi_from/pi_to = {rate:G6} x e^{pair.LogRatio:G6}, about 10^{(Math.Log(rate) + pair.LogRatio) / Math.Log(10):F0}, beyond the largest double (1.8e308); give the rate of the other direction instead, or check the energies, weights and kT");

    /// <summary>Rejects a transfer between two distinct states of one coordinate: its direction is undefined.</summary>
    private static void RequireDistinctCoordinates(int from, int to, StateSpace states, SourceSpan span)
    {
        if (from != to && states.Coordinates[from] == states.Coordinates[to])
        {
            throw new DeckException(span, SharedCoordinateMessage(from, to, states));
        }
    }

    /// <summary>As <see cref="RequireDistinctCoordinates(int, int, StateSpace, SourceSpan)"/> for row <paramref name="k"/> of <paramref name="entries"/>, located only when it fails.</summary>
    private static void RequireDistinctCoordinates(int from, int to, StateSpace states, IReadOnlyList<RateEntry> entries, int k)
    {
        if (from != to && states.Coordinates[from] == states.Coordinates[to])
        {
            throw new DeckException(entries[k].Span, SharedCoordinateMessage(from, to, states));
        }
    }

    private static string SharedCoordinateMessage(int from, int to, StateSpace states) =>
        $"the transfer from {new Pair(from, to, states).Describe()} joins two states of one coordinate, so its direction is undefined; give the states distinct coordinates";

    private static void FillDiagonal(GeneratorBuilder generator, double[] loss, StateSpace states, SourceSpan couplingSpan)
    {
        for (var column = 0; column < states.Count; column++)
        {
            var diagonal = -generator.OutflowOf(column, loss[column]);
            if (!double.IsFinite(diagonal))
            {
                throw new DeckException(couplingSpan, $"the rates out of state '{states.Labels[column]}' (state {column + 1}) add up beyond the largest double; check the rates and their units");
            }

            generator.Set(column, column, diagonal);
        }
    }

    private static string Describe(TransferDirection direction) => direction switch
    {
        TransferDirection.TowardSmaller => "toward smaller coordinate",
        _ => "toward larger coordinate",
    };

    /// <summary>An ordered pair of states: transfer from <see cref="From"/> to <see cref="To"/>.</summary>
    private readonly record struct Pair(int From, int To, StateSpace States)
    {
        /// <summary>ln(pi_from / pi_to), the log factor from this rate to its detailed-balance partner.</summary>
        public double LogRatio => States.LogEquilibrium[From] - States.LogEquilibrium[To];

        public bool Follows(TransferDirection direction) => direction == TransferDirection.TowardSmaller
            ? States.Coordinates[To] < States.Coordinates[From]
            : States.Coordinates[To] > States.Coordinates[From];

        public string Describe() => string.Create(
            CultureInfo.InvariantCulture,
            $"state '{States.Labels[From]}' (state {From + 1}, x = {States.Coordinates[From]}) to state '{States.Labels[To]}' (state {To + 1}, x = {States.Coordinates[To]})");
    }
}
