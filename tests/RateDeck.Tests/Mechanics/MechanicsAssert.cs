using RateDeck.Mechanics;
using Xunit;

namespace RateDeck.Tests.Mechanics;

/// <summary>Relative-error assertions with a readable failure message.</summary>
internal static class MechanicsAssert
{
    public static void Relative(double expected, double actual, double tolerance)
    {
        var error = Math.Abs(actual - expected) / Math.Abs(expected);
        Assert.True(
            error <= tolerance,
            FormattableString.Invariant($"expected {expected:R}, got {actual:R}: relative error {error:E2} > {tolerance:E0}"));
    }

    /// <summary>
    /// T(E) = dJ/dE (Landau and Lifshitz, Mechanics, sec. 49-50; from memory), with dJ/dE by the
    /// fourth-order central difference (8 [J(E+d) - J(E-d)] - [J(E+2d) - J(E-2d)]) / (12 d) (common practice).
    /// </summary>
    public static void PeriodIsEnergyDerivativeOfAction(Func<double, double, double> lagrangian, double energy, double d, double tolerance)
    {
        double[] energies = [energy - 2 * d, energy - d, energy + d, energy + 2 * d, energy];
        var result = LagrangianMechanics.Derive(lagrangian, energies, 1.0);
        var j = result.Actions;
        Relative((8 * (j[2] - j[1]) - (j[3] - j[0])) / (12 * d), result.Periods[4], tolerance);
    }
}
