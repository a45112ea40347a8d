namespace RateDeck.Mechanics;

/// <summary>
/// Per state, in the order of the energies given: the action J(E) = closed-orbit integral of p dq,
/// the period T(E) = dJ/dE, the semiclassical weight g(E) = T(E) / h, and the turning points
/// q_-(E) &lt; q_+(E) of the orbit, with an estimate of the relative error of J and T.
/// </summary>
/// <param name="Actions">J(E), an action (energy times time in the units of L and t).</param>
/// <param name="Periods">T(E) = dJ/dE.</param>
/// <param name="Weights">g(E) = T(E) / h, the density of states in states per unit energy.</param>
/// <param name="TurningPointsLow">q_-(E).</param>
/// <param name="TurningPointsHigh">q_+(E).</param>
/// <param name="RelativeErrors">
/// Estimated relative error of J and T (the larger): the change from the previous quadrature rule or
/// the rounding bound, whichever is larger. Conservative: on smooth wells the true error is smaller.
/// </param>
public sealed record MechanicsResult(
    double[] Actions,
    double[] Periods,
    double[] Weights,
    double[] TurningPointsLow,
    double[] TurningPointsHigh,
    double[] RelativeErrors);
