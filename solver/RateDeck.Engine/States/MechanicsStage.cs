using RateDeck.Mechanics;

namespace RateDeck.States;

/// <summary>
/// The real mechanics stage behind the <see cref="MechanicsWeightDeriver"/> seam: derives the
/// actions, periods, weights and turning points with <see cref="LagrangianMechanics.Derive"/> and
/// keeps the whole result, so that the outputs can show more than the weights the state space
/// needs. One instance serves one deck (one call of <see cref="DeriveWeights"/>).
/// </summary>
/// <param name="options">Settings of the derivation; null for the defaults (a well near q = 0 of size about 1).</param>
public sealed class MechanicsStage(MechanicsOptions? options = null)
{
    /// <summary>The result of the last derivation; null until <see cref="DeriveWeights"/> has run.</summary>
    public MechanicsResult? Result { get; private set; }

    /// <summary>
    /// g(E) = T(E) / h for each energy, in order. Throws <see cref="MechanicsException"/> when the
    /// Lagrangian gives no closed orbit at one of the energies (the builder reports it at the deck).
    /// </summary>
    /// <param name="lagrangian">L(q, v), thread-safe.</param>
    /// <param name="energies">E_i of each state, in the deck's energy unit.</param>
    /// <param name="planck">h in the deck's units.</param>
    public double[] DeriveWeights(Func<double, double, double> lagrangian, double[] energies, double planck)
    {
        Result = LagrangianMechanics.Derive(lagrangian, energies, planck, options);
        return Result.Weights;
    }
}
