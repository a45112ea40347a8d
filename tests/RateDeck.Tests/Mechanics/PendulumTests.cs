using MathNet.Numerics;
using RateDeck.Mechanics;
using Xunit;

namespace RateDeck.Tests.Mechanics;

/// <summary>
/// Plane pendulum L = m l^2 v^2 / 2 + m g l cos q. With amplitude theta0, k = sin(theta0 / 2) and
/// omega0 = sqrt(g / l): period T = 4 K(k^2) / omega0 (Landau and Lifshitz, Mechanics, sec. 11,
/// problem 1; cited from memory), K the complete elliptic integral of the first kind with parameter
/// m = k^2. The action follows by the substitution sin(q / 2) = k sin(phi), derived here:
/// J = 2 integral p dq = 16 m l^2 omega0 [E(m) - (1 - m) K(m)], E the integral of the second kind;
/// for small k it tends to the oscillator's 2 pi (E - E_bottom) / omega0.
/// </summary>
public class PendulumTests
{
    private const double _mass = 0.3;
    private const double _length = 0.7;
    private const double _gravity = 9.81;
    private static readonly double _omega0 = Math.Sqrt(_gravity / _length);

    /// <summary>The Lagrangian in the form of the brief: its potential -m g l cos q is measured from the pivot.</summary>
    private static double Lagrangian(double q, double v) => 0.5 * _mass * _length * _length * v * v + _mass * _gravity * _length * Math.Cos(q);

    private static double Energy(double amplitude) => -_mass * _gravity * _length * Math.Cos(amplitude);

    private static double Radians(double degrees) => degrees * Math.PI / 180;

    private static double Parameter(double amplitude) => Math.Pow(Math.Sin(0.5 * amplitude), 2);

    [Theory]
    [InlineData(1)]
    [InlineData(10)]
    [InlineData(30)]
    [InlineData(60)]
    [InlineData(90)]
    [InlineData(120)]
    [InlineData(150)]
    [InlineData(170)]
    [InlineData(179)]
    public void Period_IsFourKOverOmega0(double degrees)
    {
        var amplitude = Radians(degrees);
        var result = LagrangianMechanics.Derive(Lagrangian, [Energy(amplitude)], 1.0);

        // Measured: 9e-12 at 1 degree (limited by rounding: |E| is 6600 times the well's depth there),
        // 1e-12 at 179 degrees, 1e-13 or better in between.
        MechanicsAssert.Relative(4 * EllipticIntegrals.K(Parameter(amplitude)) / _omega0, result.Periods[0], 1e-10);

        // A root of U(q) = E is fixed only to about eps |E| / |U'(q)| (the condition of a root; common
        // practice), here eps / sin(theta0) in absolute terms.
        var turningTolerance = Math.Max(1e-15, 8 * 2.220446049250313e-16 / (Math.Sin(amplitude) * amplitude));
        MechanicsAssert.Relative(amplitude, result.TurningPointsHigh[0], turningTolerance);
        MechanicsAssert.Relative(-amplitude, result.TurningPointsLow[0], turningTolerance);
    }

    [Theory]
    [InlineData(179.9, 1e-9)]
    [InlineData(179.99, 1e-7)]
    public void Period_CloseToTheSeparatrix_IsWithinItsErrorEstimate(double degrees, double tolerance)
    {
        // Measured: 3e-11 (estimate 8e-10) at 179.9 degrees, 1.5e-8 (estimate 4e-8) at 179.99 degrees.
        var amplitude = Radians(degrees);
        var result = LagrangianMechanics.Derive(Lagrangian, [Energy(amplitude)], 1.0);
        var expected = 4 * EllipticIntegrals.K(Parameter(amplitude)) / _omega0;
        var error = Math.Abs(result.Periods[0] - expected) / expected;
        Assert.True(error <= result.RelativeErrors[0], FormattableString.Invariant($"error {error:E2} above its estimate {result.RelativeErrors[0]:E2}"));
        MechanicsAssert.Relative(expected, result.Periods[0], tolerance);
    }

    [Theory]
    [InlineData(10)]
    [InlineData(90)]
    [InlineData(170)]
    public void Action_MatchesTheEllipticClosedForm(double degrees)
    {
        var amplitude = Radians(degrees);
        var m = Parameter(amplitude);
        var result = LagrangianMechanics.Derive(Lagrangian, [Energy(amplitude)], 1.0);
        var expected = 16 * _mass * _length * _length * _omega0 * (EllipticIntegrals.E(m) - (1 - m) * EllipticIntegrals.K(m));
        MechanicsAssert.Relative(expected, result.Actions[0], 1e-12);
    }

    [Fact]
    public void TinyAmplitude_MeasuredFromTheBottom_KeepsFullAccuracy()
    {
        // The same pendulum with its potential 2 m g l sin^2(q / 2) measured from the bottom: no large
        // constant in L, so at 0.1 degree the period stays good to rounding: measured 1.6e-15, where the
        // brief's form, with |E| 660 000 times the depth, gives 4e-10.
        var amplitude = Radians(0.1);
        var weight = _mass * _gravity * _length;
        var result = LagrangianMechanics.Derive(
            (q, v) => 0.5 * _mass * _length * _length * v * v - 2 * weight * Math.Pow(Math.Sin(0.5 * q), 2),
            [2 * weight * Parameter(amplitude)],
            1.0);
        MechanicsAssert.Relative(4 * EllipticIntegrals.K(Parameter(amplitude)) / _omega0, result.Periods[0], 1e-13);
    }

    [Fact]
    public void Period_EqualsTheEnergyDerivativeOfTheAction()
    {
        var energy = Energy(Radians(120));
        MechanicsAssert.PeriodIsEnergyDerivativeOfAction(Lagrangian, energy, 1e-3 * (energy - Energy(0)), 1e-8);
    }

    [Fact]
    public void EnergyOverTheTop_IsRefusedAsUnbounded()
    {
        var aboveSeparatrix = 1.2 * _mass * _gravity * _length;
        var error = Assert.Throws<MechanicsException>(
            () => LagrangianMechanics.Derive(Lagrangian, [Energy(Radians(30)), aboveSeparatrix], 1.0));
        Assert.Equal(1, error.StateIndex);
        Assert.Contains("not bounded", error.Message, StringComparison.Ordinal);
        Assert.Contains("separatrix", error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void ArithmeticGeometricMean_ReproducesHandbookAndSciPyValues()
    {
        // K(m) at m = 0.1, 0.5, 0.9, 0.99 as tabulated against m in Abramowitz and Stegun, Table 17.1.
        // The digits are quoted from memory, not transcribed from the printed table; they agree
        // with SciPy 1.10.1 scipy.special.ellipk to the last digit (fixture below).
        (double M, double K)[] handbook =
        [
            (0.1, 1.6124413487202192),
            (0.5, 1.8540746773013719),
            (0.9, 2.5780921133481733),
            (0.99, 3.6956373629898747),
        ];
        foreach (var (m, k) in handbook)
        {
            MechanicsAssert.Relative(k, EllipticIntegrals.K(m), 1e-14);
        }

        // The lemniscatic case K(1/2) = Gamma(1/4)^2 / (4 sqrt(pi)) (a classical closed form; from memory), with MathNet's Gamma.
        MechanicsAssert.Relative(Math.Pow(SpecialFunctions.Gamma(0.25), 2) / (4 * Math.Sqrt(Math.PI)), EllipticIntegrals.K(0.5), 1e-14);

        // SciPy 1.10.1 scipy.special.ellipk / ellipe (tests/reference/mechanics_elliptic.py).
        var cases = EllipticIntegrals.SciPyCases();
        Assert.NotEmpty(cases);
        foreach (var (_, m, k, e) in cases)
        {
            MechanicsAssert.Relative(k, EllipticIntegrals.K(m), 1e-13);
            MechanicsAssert.Relative(e, EllipticIntegrals.E(m), 1e-13);
        }
    }

    [Fact]
    public void Period_MatchesSciPyEllipticIntegral_AtTheFixtureAmplitudes()
    {
        foreach (var (degrees, m, k, _) in EllipticIntegrals.SciPyCases().Where(c => c.AmplitudeDegrees is not null))
        {
            var amplitude = Radians(degrees!.Value);
            var result = LagrangianMechanics.Derive(Lagrangian, [Energy(amplitude)], 1.0);

            // m is rounded independently here and in NumPy; near the separatrix dK/dm amplifies that.
            var tolerance = degrees > 179.5 ? 1e-9 : 1e-10;
            Assert.True(Math.Abs(Parameter(amplitude) - m) <= 4e-16);
            MechanicsAssert.Relative(4 * k / _omega0, result.Periods[0], tolerance);
        }
    }
}
