namespace RateDeck.Diagnostics;

/// <summary>Log-space helpers: Boltzmann factors of real decks span hundreds of decades.</summary>
internal static class LogSpace
{
    /// <summary>exp(log_i) over <paramref name="states"/>, normalised to sum 1 by log-sum-exp, in the order of <paramref name="states"/>.</summary>
    public static double[] NormalizedOn(double[] logValues, IReadOnlyList<int> states)
    {
        var top = states.Max(s => logValues[s]);
        var logSum = top + Math.Log(states.Sum(s => Math.Exp(logValues[s] - top)));
        return [.. states.Select(s => Math.Exp(logValues[s] - logSum))];
    }
}
