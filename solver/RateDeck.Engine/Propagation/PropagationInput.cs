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
}
