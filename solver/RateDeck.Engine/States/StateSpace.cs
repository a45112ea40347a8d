using RateDeck.Mechanics;

namespace RateDeck.States;

/// <summary>
/// The states of a deck with everything evaluated: coordinates, energies, the logarithm of each
/// weight and the logarithm of the normalised equilibrium distribution
/// ln pi_i = ln g_i - E_i / kT - ln Z. Only logarithms are stored because Boltzmann factors of real
/// decks span hundreds of decades.
/// </summary>
public sealed class StateSpace
{
    /// <summary>Creates a state space; <paramref name="logEquilibrium"/> must be normalised (log-sum-exp = 0).</summary>
    public StateSpace(string[] labels, double[] coordinates, double[] energies, double[] logWeights, double kT, double[] logEquilibrium)
    {
        Labels = labels;
        Coordinates = coordinates;
        Energies = energies;
        LogWeights = logWeights;
        KT = kT;
        LogEquilibrium = logEquilibrium;
    }

    /// <summary>Number of states.</summary>
    public int Count => Labels.Length;

    /// <summary>State labels, unique.</summary>
    public string[] Labels { get; }

    /// <summary>State coordinates x_i.</summary>
    public double[] Coordinates { get; }

    /// <summary>Energies E_i in the deck's energy unit.</summary>
    public double[] Energies { get; }

    /// <summary>ln g_i.</summary>
    public double[] LogWeights { get; }

    /// <summary>
    /// g_i as the deck gave them (values or expression) or the mechanics stage derived them, for
    /// outputs that write the weights: exp(ln g) would print 3.0000000000000004 for a given 3. Null
    /// where the weights exist only as logarithms (the isotropic measure, or a state space built in
    /// code); the numerics use <see cref="LogWeights"/> alone.
    /// </summary>
    public double[]? Weights { get; init; }

    /// <summary>kT in the deck's energy unit.</summary>
    public double KT { get; }

    /// <summary>ln pi_i, normalised so that sum_i pi_i = 1.</summary>
    public double[] LogEquilibrium { get; }

    /// <summary>
    /// What the mechanics stage derived from the deck's Lagrangian at the state energies (actions,
    /// periods, weights, turning points), in state order; null when the deck has no Lagrangian.
    /// </summary>
    public MechanicsResult? Mechanics { get; init; }

    /// <summary>Which of energies and weights the deck gave; pi made only of defaults (all E 0, all g 1) is no claim.</summary>
    public Decks.EquilibriumGiven EquilibriumGiven { get; init; } = Decks.EquilibriumGiven.EnergiesAndWeights;
}
