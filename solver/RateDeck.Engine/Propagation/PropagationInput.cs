namespace RateDeck.Propagation;

/// <summary>Argument checks shared by every propagator: these are programming errors, not deck errors.</summary>
internal static class PropagationInput
{
    /// <summary>Throws unless <paramref name="initial"/> has one finite entry per state and <paramref name="times"/> is finite, non-negative and ascending.</summary>
    public static void Check(int stateCount, double[] initial, IReadOnlyList<double> times)
    {
        ArgumentNullException.ThrowIfNull(initial);
        ArgumentNullException.ThrowIfNull(times);
        if (initial.Length != stateCount)
        {
            throw new ArgumentException(
                $"the initial populations have {initial.Length} entries but the rate matrix has {stateCount} states", nameof(initial));
        }

        if (initial.Any(p => !double.IsFinite(p)))
        {
            throw new ArgumentException("the initial populations must all be finite", nameof(initial));
        }

        for (var k = 0; k < times.Count; k++)
        {
            if (!double.IsFinite(times[k]) || times[k] < 0 || (k > 0 && times[k] < times[k - 1]))
            {
                throw new ArgumentException("output times must be finite, non-negative and ascending", nameof(times));
            }
        }
    }

    /// <summary>
    /// Sets every output at t = 0 to a copy of <paramref name="initial"/>: P(0) is known exactly,
    /// and a round trip through a decomposition would return it with rounding (1 + 4e-16, -6e-14).
    /// </summary>
    public static void PinStart(double[] initial, IReadOnlyList<double> times, double[][] populations)
    {
        for (var k = 0; k < times.Count && times[k] == 0; k++)
        {
            populations[k] = (double[])initial.Clone();
        }
    }
}
