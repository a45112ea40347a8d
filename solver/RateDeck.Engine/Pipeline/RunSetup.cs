using System.Globalization;
using RateDeck.Decks;
using RateDeck.States;

namespace RateDeck.Pipeline;

/// <summary>What a deck's [initial] and [run] tables mean in numbers: P(0) and the output times.</summary>
public static class RunSetup
{
    /// <summary>
    /// P(0): all mass in one state, per-state values or an expression (each finite and >= 0), or
    /// the normalised equilibrium pi (exp of ln pi; states below the smallest double start at 0).
    /// </summary>
    public static double[] InitialPopulations(Deck deck, StateSpace states) => deck.Initial switch
    {
        InitialInState single => Enumerable.Range(0, states.Count).Select(k => k == single.State ? 1.0 : 0.0).ToArray(),
        InitialGiven given => PerStateEvaluator.Evaluate(deck, given.Source, "initial population", PerStateRequirement.NonNegative),
        InitialEquilibrium => states.EquilibriumPopulations(),
        _ => throw new NotSupportedException($"unknown initial state {deck.Initial.GetType().Name}"),
    };

    /// <summary>
    /// Significant digits kept for a computed grid time: the propagators then run to, and the files
    /// show, the decimal number the grid means (1e-4, not 1.0000000000000002E-04); the shift is at
    /// most 5e-13 of the time, far below any rate's resolution.
    /// </summary>
    public const int GridTimeDigits = 12;

    /// <summary>
    /// The output times: t = 0, then the deck's listed times (and t_end when the list stops short of
    /// it), or <see cref="RunSpec.OutputCount"/> times up to t_end, evenly
    /// spaced or geometric from t_first. t_first and t_end are the deck's numbers exactly; the times
    /// between are rounded to <see cref="GridTimeDigits"/> significant digits.
    /// </summary>
    public static double[] OutputTimes(RunSpec run, double? endTimeOverride = null)
    {
        var end = endTimeOverride ?? run.EndTime;
        if (run.ListedTimes is { } listed && endTimeOverride is null)
        {
            return [0.0, .. listed, .. listed[^1] < end ? new[] { end } : []];
        }

        var count = run.OutputCount;
        var times = new double[count + 1];
        if (run.Spacing == OutputSpacing.Logarithmic && count > 1)
        {
            var first = run.FirstTime ?? end * 1e-4;
            var logFirst = Math.Log(first);
            var step = (Math.Log(end) - logFirst) / (count - 1);
            for (var k = 2; k < count; k++)
            {
                times[k] = RoundGridTime(Math.Exp(logFirst + (k - 1) * step));
            }

            times[1] = first;
        }
        else
        {
            for (var k = 1; k < count; k++)
            {
                // end * k overflows for an end time near the largest double; end / count * k does
                // not, and is kept for that case only so that ordinary grids keep their values.
                times[k] = RoundGridTime(double.IsFinite(end * k) ? end * k / count : end / count * k);
            }
        }

        times[count] = end;
        return times;
    }

    private static double RoundGridTime(double time) =>
        double.Parse(time.ToString($"G{GridTimeDigits}", CultureInfo.InvariantCulture), CultureInfo.InvariantCulture);
}
