using RateDeck.Mechanics;

namespace RateDeck.States;

/// <summary>
/// The mechanics stage as the state-space builder sees it: from a Lagrangian L(q, v), the state
/// energies and Planck's constant h (deck units), the actions, periods, weights g(E) = T(E) / h and
/// turning points of each state, in the order of <paramref name="energies"/>. The real stage is
/// <see cref="LagrangianMechanics.Derive"/>; tests may pass another.
/// </summary>
/// <param name="lagrangian">L(q, v), thread-safe.</param>
/// <param name="energies">E_i of each state, in the deck's energy unit.</param>
/// <param name="planck">h in the deck's units.</param>
public delegate MechanicsResult MechanicsDeriver(Func<double, double, double> lagrangian, double[] energies, double planck);
