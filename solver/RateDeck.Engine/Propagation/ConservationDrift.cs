using RateDeck.Rates;

namespace RateDeck.Propagation;

/// <summary>
/// How far a computed trajectory's total population moves on a deck that conserves it (no pumping,
/// no loss: K's columns sum to zero, so the exact total is constant). A propagator's rounding shows
/// here first: the contour path on a very stiff ladder keeps the total only to about 1e-9 at
/// t rho = 1e10, far above the double's own resolution, and every population below that fraction
/// of the total is then noise. The drift is a lower bound on the error, measured, not estimated.
/// </summary>
public static class ConservationDrift
{
    /// <summary>
    /// max over the outputs of |sum P(t) - sum P(0)| / |sum P(0)|; null when the deck is pumped or
    /// loses population (its total is not constant) or starts empty.
    /// </summary>
    public static double? Of(RateMatrix rates, Trajectory trajectory)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(trajectory);
        if (rates.IsDriven || rates.Loss.Any(loss => loss != 0) || trajectory.Populations.Length == 0)
        {
            return null;
        }

        var start = trajectory.Populations[0].Sum();
        return start == 0 || !double.IsFinite(start)
            ? null
            : trajectory.Populations.Max(p => Math.Abs(p.Sum() - start)) / Math.Abs(start);
    }
}
