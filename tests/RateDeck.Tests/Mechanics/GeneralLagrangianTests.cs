using RateDeck.Mechanics;
using Xunit;

namespace RateDeck.Tests.Mechanics;

/// <summary>
/// Lagrangians that are not m v^2 / 2 - V(q), to show the Legendre transform is taken in general.
/// </summary>
public class GeneralLagrangianTests
{
    private const double _restMass = 2.0;

    [Fact]
    public void RelativisticKineticTerm_TransformsToTheRelativisticHamiltonian()
    {
        // L = -m sqrt(1 - v^2) - V(q), c = 1, V = q^2 / 2. By hand at q = 0.5, v = 0.6 with m = 2:
        // gamma = 1 / sqrt(1 - 0.36) = 1.25, p = m gamma v = 1.5, H = m gamma + V = 2.5 + 0.125 = 2.625
        // (the standard relativistic momentum and energy, e.g. Landau and Lifshitz, Classical Theory of Fields, sec. 9).
        var transform = new LegendreTransform((q, v) => -_restMass * Math.Sqrt(1 - v * v) - 0.5 * q * q);
        MechanicsAssert.Relative(1.5, transform.Momentum(0.5, 0.6), 1e-13);
        MechanicsAssert.Relative(2.625, transform.EnergyFunction(0.5, 0.6), 1e-13);
        MechanicsAssert.Relative(0.6, transform.Velocity(0.5, 1.5), 1e-13);
        MechanicsAssert.Relative(2.625, transform.Hamiltonian(0.5, 1.5), 1e-13);
    }

    [Theory]
    [InlineData(1.2)]
    [InlineData(2.0)]
    [InlineData(10.0)]
    public void RelativisticLinearWell_MatchesTheConstantForceClosedForm(double energyOverMass)
    {
        // L = -m sqrt(1 - v^2) - F |q|, so H = sqrt(m^2 + p^2) + F |q|. The force is constant on each side,
        // dp/dt = -F sign(q), whatever the speed (Landau and Lifshitz, Classical Theory of Fields, sec. 20,
        // motion in a constant field; from memory), so a quarter period is p_max / F: T = 4 sqrt(E^2 - m^2) / F. Turning points |q| = (E - m) / F, and
        // J = 4 integral_0^{(E-m)/F} sqrt((E - F q)^2 - m^2) dq = (2 / F) [E p_max - m^2 ln((E + p_max) / m)], derived here.
        const double force = 0.7;
        var energy = energyOverMass * _restMass;
        var result = LagrangianMechanics.Derive((q, v) => -_restMass * Math.Sqrt(1 - v * v) - force * Math.Abs(q), [energy], 1.0);

        // Measured: 1e-13 or better.
        var momentum = Math.Sqrt(energy * energy - _restMass * _restMass);
        MechanicsAssert.Relative(4 * momentum / force, result.Periods[0], 1e-11);
        MechanicsAssert.Relative(2 / force * (energy * momentum - _restMass * _restMass * Math.Log((energy + momentum) / _restMass)), result.Actions[0], 1e-11);
        MechanicsAssert.Relative((energy - _restMass) / force, result.TurningPointsHigh[0], 1e-14);
    }

    [Fact]
    public void TermsLinearInVelocity_ChangeNeitherTheOrbitNorTheAction()
    {
        // L = v^2 / 2 + a q v + b v - q^2 / 2: a q v + b v = d(a q^2 / 2 + b q)/dt is a total derivative, which
        // leaves the equations of motion unchanged (Landau and Lifshitz, Mechanics, sec. 2; from memory) and
        // integrates to zero around a closed orbit, so J = 2 pi E and T = 2 pi as for the unit oscillator, and
        // the orbit turns where v = 0, at q = +-sqrt(2 E) - not where p = a q + b vanishes.
        const double a = 0.9, b = 0.3;
        double[] energies = [0.5, 2.0];
        var result = LagrangianMechanics.Derive((q, v) => 0.5 * v * v + a * q * v + b * v - 0.5 * q * q, energies, 1.0);
        for (var i = 0; i < energies.Length; i++)
        {
            MechanicsAssert.Relative(2 * Math.PI * energies[i], result.Actions[i], 1e-12);
            MechanicsAssert.Relative(2 * Math.PI, result.Periods[i], 1e-12);
            MechanicsAssert.Relative(Math.Sqrt(2 * energies[i]), result.TurningPointsHigh[i], 1e-14);
        }

        // H = (p - a q - b)^2 / 2 + q^2 / 2, by hand at q = 0.4, p = 1.1: (1.1 - 0.36 - 0.3)^2 / 2 + 0.08 = 0.1768.
        var transform = new LegendreTransform((q, v) => 0.5 * v * v + a * q * v + b * v - 0.5 * q * q);
        MechanicsAssert.Relative(0.1768, transform.Hamiltonian(0.4, 1.1), 1e-13);
    }
}
