using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.Text;

namespace RateDeck.Diagnostics;

/// <summary>
/// A rate completed by detailed balance that dwarfs the rate it was completed from.
/// </summary>
/// <param name="From">Label of the state the completed rate leaves.</param>
/// <param name="To">Label of the state it enters.</param>
/// <param name="Rate">The completed rate K[to, from], per time unit.</param>
/// <param name="MeasuredRate">The given rate of the reverse direction it was completed from.</param>
/// <param name="LogBoltzmannFactor">ln(pi_to / pi_from) = ln(g_to / g_from) - (E_to - E_from) / kT, the factor between the two.</param>
/// <param name="EnergyGapOverKT">(E_from - E_to) / kT, the energy part of that factor.</param>
public sealed record LargeCompletedRate(string From, string To, double Rate, double MeasuredRate, double LogBoltzmannFactor, double EnergyGapOverKT)
{
    /// <summary>One line naming the pair, both rates and the Boltzmann factor.</summary>
    public string Describe(string timeUnit) =>
        $"the completed rate {From} -> {To} is {Format.Number(Rate)} /{timeUnit}: the given rate {To} -> {From} ({Format.Number(MeasuredRate)} /{timeUnit}) "
        + $"times the Boltzmann factor pi_{To}/pi_{From} = e^{Format.Number(LogBoltzmannFactor)} = {FactorText()} "
        + $"((E_{From} - E_{To})/kT = {Format.Number(EnergyGapOverKT)})";

    private string FactorText() => LogBoltzmannFactor < 700
        ? Format.Number(Math.Exp(LogBoltzmannFactor))
        : $"10^{Format.Number(LogBoltzmannFactor / Math.Log(10))}";
}

/// <summary>
/// Finds completed rates more than 1/eps (4.5e15, 36 e-folds) times the given rate of the same
/// pair. Eigenvalues of K are resolved only to about eps ||K|| (Golub and Van Loan, Matrix
/// Computations, 4th ed., sec. 7.2, from memory), so beside such a rate the given one, and the slow
/// modes it sets, fall below the spectrum's resolution: a null-space count or a slow rate is then
/// an artefact of rounding. Such a pair usually means the rates were measured uphill and completed
/// downhill across a large gap, or kT is far too small.
/// </summary>
public static class LargeCompletedRates
{
    /// <summary>ln(1/eps) = 36.04: a completed rate more than this many e-folds above its given partner is flagged.</summary>
    public static readonly double LogThreshold = -Math.Log(Precision.MachineEpsilon);

    /// <summary>How many pairs a report lists (the largest factors first); all are counted.</summary>
    public const int Listed = 5;

    /// <summary>
    /// The flagged pairs of <paramref name="rates"/>, largest Boltzmann factor first, and their
    /// count. Empty unless the matrix was completed by detailed balance from rates given in
    /// <paramref name="given"/>'s direction (a full measured matrix has nothing completed).
    /// </summary>
    public static (IReadOnlyList<LargeCompletedRate> Listed, int Count) Find(RateMatrix rates, CouplingSpec given)
    {
        ArgumentNullException.ThrowIfNull(rates);
        var direction = given switch
        {
            MeasuredOneWay oneWay => oneWay.Direction,
            KernelModel kernel => kernel.Direction,
            _ => default(TransferDirection?),
        };
        if (direction is null || rates.Origin != BalanceOrigin.CompletedByDetailedBalance)
        {
            return ([], 0);
        }

        var states = rates.States;
        var x = states.Coordinates;
        var logPi = states.LogEquilibrium;

        // No pair's factor ln pi_to - ln pi_from exceeds the spread of ln pi: within the threshold, no entry needs a look.
        if (logPi.Length == 0 || logPi.Max() - logPi.Min() <= LogThreshold)
        {
            return ([], 0);
        }

        var found = new List<LargeCompletedRate>();
        rates.ForEachOffDiagonal((to, from, rate) =>
        {
            // The given rates go in the declared direction; an entry against it was completed.
            var completed = direction == TransferDirection.TowardSmaller ? x[to] > x[from] : x[to] < x[from];
            var logFactor = logPi[to] - logPi[from];
            if (completed && rate > 0 && logFactor > LogThreshold)
            {
                var gap = (states.Energies[from] - states.Energies[to]) / states.KT;
                found.Add(new LargeCompletedRate(states.Labels[from], states.Labels[to], rate, Math.Exp(Math.Log(rate) - logFactor), logFactor, gap));
            }
        });

        return ([.. found.OrderByDescending(f => f.LogBoltzmannFactor).Take(Listed)], found.Count);
    }

    /// <summary>The note printed by the verbs: the pairs and what to do; null when nothing is flagged.</summary>
    public static string? Note(RateMatrix rates, CouplingSpec given, string timeUnit)
    {
        var (listed, count) = Find(rates, given);
        if (count == 0)
        {
            return null;
        }

        return $"{Format.Count(count, "completed rate exceeds", "completed rates exceed")} the given rate of its pair by more than 1/eps = {Format.Number(1 / Precision.MachineEpsilon)}: "
            + string.Join("; ", listed.Select(f => f.Describe(timeUnit))) + (count > listed.Count ? "; ..." : "")
            + ". Beside such a rate the given rates and the slow modes they set are below the spectrum's resolution (about eps x the largest rate), "
            + "so null-space and slow-rate figures are rounding; give the rates in the other direction (downhill) or check the energies, weights and kT";
    }
}
