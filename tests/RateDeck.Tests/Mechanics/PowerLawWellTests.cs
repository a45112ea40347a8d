using MathNet.Numerics;
using RateDeck.Mechanics;
using Xunit;

namespace RateDeck.Tests.Mechanics;

/// <summary>
/// Power-law well L = m v^2 / 2 - c |q|^n. Turning points a = (E / c)^(1/n); with u = (q / a)^n,
/// J = 4 sqrt(2 m E) integral_0^a sqrt(1 - (q/a)^n) dq = 4 sqrt(2 m) E^(1/2 + 1/n) c^(-1/n) B(1/n, 3/2) / n,
/// B(x, y) = Gamma(x) Gamma(y) / Gamma(x + y), derived here. Its E-derivative is the period
/// T = (1/2 + 1/n) J / E = (2 sqrt(2 pi m) / n) (E / c)^(1/n) E^(-1/2) Gamma(1/n) / Gamma(1/n + 1/2),
/// the result of Landau and Lifshitz, Mechanics, sec. 11, problem 2(a) (cited from memory, section
/// number not checked against the printed book).
/// Gamma is MathNet.Numerics.SpecialFunctions.Gamma, the reference library.
/// </summary>
public class PowerLawWellTests
{
    private const double _mass = 1.3;
    private const double _strength = 0.8;

    private static double ClosedFormAction(double n, double energy)
    {
        var beta = SpecialFunctions.Gamma(1 / n) * SpecialFunctions.Gamma(1.5) / SpecialFunctions.Gamma(1 / n + 1.5);
        return 4 * Math.Sqrt(2 * _mass) * Math.Pow(energy, 0.5 + 1 / n) * Math.Pow(_strength, -1 / n) * beta / n;
    }

    [Theory]
    [InlineData(1.0)]
    [InlineData(1.5)]
    [InlineData(2.0)]
    [InlineData(3.0)]
    [InlineData(4.0)]
    [InlineData(6.0)]
    public void ActionAndPeriod_MatchTheBetaFunctionClosedForm(double n)
    {
        double[] energies = [0.01, 1, 50];
        var result = LagrangianMechanics.Derive((q, v) => 0.5 * _mass * v * v - _strength * Math.Pow(Math.Abs(q), n), energies, 1.0);

        // Measured: 5e-14 or better for n = 1.5 (its kink |q|^1.5 at the bottom is only algebraic), 5e-15 otherwise.
        for (var i = 0; i < energies.Length; i++)
        {
            var action = ClosedFormAction(n, energies[i]);
            var period = (0.5 + 1 / n) * action / energies[i];
            var reach = Math.Pow(energies[i] / _strength, 1 / n);
            MechanicsAssert.Relative(action, result.Actions[i], 1e-12);
            MechanicsAssert.Relative(period, result.Periods[i], 1e-12);
            MechanicsAssert.Relative(reach, result.TurningPointsHigh[i], 1e-14);
            MechanicsAssert.Relative(-reach, result.TurningPointsLow[i], 1e-14);
        }
    }

    [Fact]
    public void ClosedForm_AtNEqualsTwo_IsTheOscillator()
    {
        // c = m w^2 / 2 makes the well the oscillator, whose action is 2 pi E / w (Landau and Lifshitz, Mechanics, sec. 49-50; from memory).
        var omega = Math.Sqrt(2 * _strength / _mass);
        MechanicsAssert.Relative(2 * Math.PI * 3.0 / omega, ClosedFormAction(2, 3.0), 1e-14);
    }

    [Fact]
    public void Period_EqualsTheEnergyDerivativeOfTheAction_InAQuarticWell()
        => MechanicsAssert.PeriodIsEnergyDerivativeOfAction((q, v) => 0.5 * _mass * v * v - _strength * Math.Pow(q, 4), 2.0, 1e-3, 1e-9);
}
