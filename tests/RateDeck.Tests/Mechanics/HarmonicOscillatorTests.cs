using RateDeck.Mechanics;
using Xunit;

namespace RateDeck.Tests.Mechanics;

/// <summary>
/// L = m v^2/2 - m w^2 q^2/2. Action variable I = (1/2 pi) closed integral of p dq = E / w, so
/// J = 2 pi E / w, and T = dJ/dE = 2 pi / w for every amplitude: the weights g = T / h are constant
/// (Landau and Lifshitz, Mechanics, 3rd ed., sec. 21 on the oscillator and sec. 49-50 on the action
/// variable; cited from memory).
/// </summary>
public class HarmonicOscillatorTests
{
    private const double _mass = 1.7;
    private const double _omega = 2.3;
    private const double _planck = 0.05;

    private static double Lagrangian(double q, double v) => 0.5 * _mass * v * v - 0.5 * _mass * _omega * _omega * q * q;

    [Fact]
    public void Action_IsTwoPiEnergyOverOmega_AndPeriodIsTwoPiOverOmega()
    {
        double[] energies = [1e-3, 0.1, 1, 7.5, 300];
        var result = LagrangianMechanics.Derive(Lagrangian, energies, _planck);

        for (var i = 0; i < energies.Length; i++)
        {
            var amplitude = Math.Sqrt(2 * energies[i] / (_mass * _omega * _omega));
            MechanicsAssert.Relative(2 * Math.PI * energies[i] / _omega, result.Actions[i], 1e-12);
            MechanicsAssert.Relative(2 * Math.PI / _omega, result.Periods[i], 1e-12);
            MechanicsAssert.Relative(2 * Math.PI / (_omega * _planck), result.Weights[i], 1e-12);
            MechanicsAssert.Relative(-amplitude, result.TurningPointsLow[i], 1e-13);
            MechanicsAssert.Relative(amplitude, result.TurningPointsHigh[i], 1e-13);
        }
    }

    [Fact]
    public void ErrorEstimate_IsTinyAndCoversTheActualError()
    {
        double[] energies = [0.01, 1, 100];
        var result = LagrangianMechanics.Derive(Lagrangian, energies, _planck);
        for (var i = 0; i < energies.Length; i++)
        {
            var actual = Math.Abs(result.Periods[i] - 2 * Math.PI / _omega) / (2 * Math.PI / _omega);
            Assert.True(result.RelativeErrors[i] < 1e-12);
            Assert.True(actual <= result.RelativeErrors[i], FormattableString.Invariant($"error {actual:E2} above estimate {result.RelativeErrors[i]:E2}"));
        }
    }

    [Fact]
    public void WellAwayFromTheSearchInterval_IsFoundDownhill()
    {
        // The same oscillator centred at q = 40: the search walks downhill from [-1, 1].
        var result = LagrangianMechanics.Derive((q, v) => Lagrangian(q - 40, v), [2.0], _planck);
        MechanicsAssert.Relative(2 * Math.PI * 2.0 / _omega, result.Actions[0], 1e-10);
        MechanicsAssert.Relative(40 + Math.Sqrt(4 / (_mass * _omega * _omega)), result.TurningPointsHigh[0], 1e-13);
    }
}
