namespace RateDeck.States;

/// <summary>Helpers on a <see cref="StateSpace"/>.</summary>
public static class StateSpaceExtensions
{
    /// <summary>
    /// pi_i = exp(ln pi_i). Safe: ln pi_i &lt;= 0 after normalisation, so nothing overflows; states
    /// more than about 745 e-folds below the most populated one come out as exactly 0.
    /// </summary>
    public static double[] EquilibriumPopulations(this StateSpace states) => states.LogEquilibrium.Select(Math.Exp).ToArray();
}
