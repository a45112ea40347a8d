using RateDeck.Decks;
using RateDeck.Rates;
using RateDeck.Text;

namespace RateDeck.Propagation;

/// <summary>The explicit step chosen for accuracy, and what the estimate behind it said.</summary>
/// <param name="Dt">The step chosen.</param>
/// <param name="Cap">The hard cap it was chosen under (run.safety times the stability limit, and for Euler the positivity limit).</param>
/// <param name="EstimatedError">Step-doubling estimate of max |explicit - exact| over the total population at <paramref name="Dt"/>.</param>
/// <param name="TargetMet">True when <paramref name="EstimatedError"/> is within the target.</param>
/// <param name="Reason">One line: how the step was found.</param>
public sealed record AccurateStep(double Dt, double Cap, double EstimatedError, bool TargetMet, string Reason);

/// <summary>
/// Chooses the explicit step from an error estimate (step doubling, Hairer, Norsett and Wanner,
/// Solving Ordinary Differential Equations I, sec. II.4): a method of order p run at h and at h/2
/// to the same output times differs by about C h^p (1 - 2^-p), so the error at h is that difference
/// over (1 - 2^-p). Starting at the cap, the step shrinks to h (0.8 target / error)^(1/p) until the
/// estimate at h meets the target, measured like the run's comparison: the largest difference over
/// the total population at each output time. The cap (stability and positivity) is never exceeded.
/// </summary>
public static class AccurateStepChoice
{
    /// <summary>Aim this far below the target when shrinking, so that one more round usually suffices.</summary>
    private const double _aim = 0.8;

    /// <summary>Rounds of (h, h/2) pairs before giving up: each round corrects the step by the measured error.</summary>
    private const int _maxRounds = 6;

    /// <summary>
    /// Largest work of one trial pair, in stored entries of K visited (stages x entries x steps):
    /// 4e9, a few seconds on one core. A target needing more is reported, not chased.
    /// </summary>
    public const double WorkBudget = 4e9;

    /// <summary>
    /// The step for <paramref name="method"/> on <paramref name="rates"/> from <paramref name="initial"/>
    /// to <paramref name="times"/> whose estimated error is within <paramref name="target"/>, at
    /// most <paramref name="cap"/>.
    /// </summary>
    public static AccurateStep Choose(RateMatrix rates, ExplicitMethod method, double[] initial, double[] times, double cap, double target)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(times);
        var order = method == ExplicitMethod.Euler ? 1 : 4;
        var stages = method == ExplicitMethod.Euler ? 1 : 4;
        var entries = rates.Sparse?.StoredCount ?? ((double)rates.Count * rates.Count);
        var horizon = times.Length > 0 ? times[^1] : 0;
        var unit = rates.TimeUnit;
        var h = cap;
        var error = double.NaN;
        var tried = h;
        var widest = times.Select((t, k) => t - (k == 0 ? 0 : times[k - 1])).DefaultIfEmpty(h).Max();
        for (var round = 1; round <= _maxRounds; round++)
        {
            var work = stages * entries * ((horizon / h * 3) + (times.Length * 3));
            if (work > WorkBudget)
            {
                return new AccurateStep(tried, cap, error, false, $"a trial at dt = {Format.Time(h, unit)} for the accuracy target {Format.Number(target)} would exceed the budget of {Format.Number(WorkBudget)} entry visits, so dt stays {Format.Time(tried, unit)} "
                    + (double.IsNaN(error) ? "without an estimate" : $"(estimated error {Format.Number(error)} of the total)") + "; rely on the exact result, or set run.accuracy larger");
            }

            var coarse = ExplicitPropagatorChoice.Create(rates, method, h).Propagate(initial, times);
            var fine = HalfSteps(ExplicitPropagatorChoice.Create(rates, method, h / 2), initial, times);
            error = TrajectoryComparison.Compare(fine, coarse).MaxRelativeToTotal / (1 - Math.Pow(2, -order));
            if (double.IsNaN(error))
            {
                // The trial overflowed (numbers near the largest double): no step size can be estimated.
                return new AccurateStep(tried, cap, error, false, $"the explicit trial at dt = {Format.Time(h, unit)} overflows, so no error estimate is possible; rely on the exact result");
            }

            if (error <= target)
            {
                var how = round == 1 ? "the cap already meets it" : $"found in {round} rounds";
                return new AccurateStep(h, cap, error, true,
                    $"step doubling estimates the error at {Format.Number(error)} of the total, within the accuracy target {Format.Number(target)} ({how}; cap {Format.Time(cap, unit)})");
            }

            tried = h;
            // A step wider than every output interval acts as the widest interval: shrink from that.
            h = Math.Min(h, widest) * Math.Min(0.9, Math.Pow(_aim * target / error, 1.0 / order));
        }

        return new AccurateStep(tried, cap, error, false,
            $"after {_maxRounds} rounds of step doubling the estimated error is still {Format.Number(error)} of the total, above the accuracy target {Format.Number(target)}");
    }

    /// <summary>
    /// The run at half steps, reported at <paramref name="times"/>. Each output interval is split at
    /// its midpoint too: where outputs lie closer than the step, the coarse run takes one shortened
    /// step per interval, and only the split halves that step as well.
    /// </summary>
    private static Trajectory HalfSteps(IPropagator propagator, double[] initial, double[] times)
    {
        var refined = new List<double>(2 * times.Length);
        var kept = new int[times.Length];
        for (var k = 0; k < times.Length; k++)
        {
            var previous = k == 0 ? 0.0 : times[k - 1];
            var middle = 0.5 * (previous + times[k]);
            if (middle > previous && middle < times[k])
            {
                refined.Add(middle);
            }

            kept[k] = refined.Count;
            refined.Add(times[k]);
        }

        var fine = propagator.Propagate(initial, refined);
        return new Trajectory(times, [.. kept.Select(index => fine.Populations[index])]);
    }
}
