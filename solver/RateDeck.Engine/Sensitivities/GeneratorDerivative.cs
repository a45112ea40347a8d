namespace RateDeck.Sensitivities;

/// <summary>
/// The derivative of a deck's model with respect to one input (<see cref="GeneratorDerivatives.Of"/>):
/// of the generator K (every entry, the diagonal included), the pumping s, P(0) and the normalised ln pi.
/// </summary>
/// <param name="Generator">dK, N x N column-major (entry (i, j) at j N + i).</param>
/// <param name="Pumping">ds.</param>
/// <param name="Initial">dP(0).</param>
/// <param name="LogEquilibrium">d ln pi (pi normalised).</param>
public sealed record GeneratorDerivative(double[] Generator, double[] Pumping, double[] Initial, double[] LogEquilibrium);
