using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.States;

namespace RateDeck.Rates;

/// <summary>How the off-diagonal rates of a <see cref="RateMatrix"/> were obtained.</summary>
public enum BalanceOrigin
{
    /// <summary>One direction given, the other completed as K_ji = K_ij pi_j / pi_i: detailed balance holds by construction.</summary>
    CompletedByDetailedBalance,
    /// <summary>A full matrix taken as given: detailed balance must be checked.</summary>
    TakenAsGiven,
}

/// <summary>
/// The generator of dP/dt = K P + s. <see cref="Generator"/>[i, j] (i != j) is the rate from state j
/// to state i; the diagonal is minus the column's off-diagonal sum minus the state's loss, so
/// every column sums to minus its loss.
/// </summary>
public sealed class RateMatrix
{
    /// <summary>Wraps an assembled generator.</summary>
    public RateMatrix(StateSpace states, DenseMatrix generator, double[] loss, double[] pumping, BalanceOrigin origin)
    {
        States = states;
        Generator = generator;
        Loss = loss;
        Pumping = pumping;
        Origin = origin;
    }

    /// <summary>The states the matrix acts on.</summary>
    public StateSpace States { get; }

    /// <summary>K, dense, column-major.</summary>
    public DenseMatrix Generator { get; }

    /// <summary>Sink rate of each state (zero when none).</summary>
    public double[] Loss { get; }

    /// <summary>Injection rate into each state (zero when none).</summary>
    public double[] Pumping { get; }

    /// <summary>How the off-diagonal rates were obtained.</summary>
    public BalanceOrigin Origin { get; }

    /// <summary>Number of states.</summary>
    public int Count => States.Count;

    /// <summary>True when any state is pumped.</summary>
    public bool IsDriven => Pumping.Any(s => s != 0);
}
