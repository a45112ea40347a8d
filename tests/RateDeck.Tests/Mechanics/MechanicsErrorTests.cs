using RateDeck.Mechanics;
using Xunit;

namespace RateDeck.Tests.Mechanics;

/// <summary>Models without a bounded orbit are refused with a plain message naming the state.</summary>
public class MechanicsErrorTests
{
    private static double Oscillator(double q, double v) => 0.5 * v * v - 0.5 * q * q;

    [Fact]
    public void EnergyBelowTheBottom_IsRefused()
    {
        var error = Assert.Throws<MechanicsException>(() => LagrangianMechanics.Derive(Oscillator, [1.0, -0.5], 1.0));
        Assert.Equal(1, error.StateIndex);
        Assert.Contains("bottom of the well", error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void PotentialWithoutAWell_IsRefused()
    {
        // U(q) = -L(q, 0) = -q falls without end.
        var error = Assert.Throws<MechanicsException>(() => LagrangianMechanics.Derive((q, v) => 0.5 * v * v + q, [1.0], 1.0));
        Assert.Null(error.StateIndex);
        Assert.Contains("no potential well", error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void EnergyAboveAnOpenWell_IsRefusedAsUnbounded()
    {
        // U(q) = -1 / (1 + q^2) rises to 0 without a barrier: every E >= 0 escapes to infinity.
        double Lagrangian(double q, double v) => 0.5 * v * v + 1 / (1 + q * q);
        // Below 0 the orbit is bounded: U = -0.5 at q = +-1.
        MechanicsAssert.Relative(1, LagrangianMechanics.Derive(Lagrangian, [-0.5], 1.0).TurningPointsHigh[0], 1e-15);
        var error = Assert.Throws<MechanicsException>(() => LagrangianMechanics.Derive(Lagrangian, [-0.5, 0.1], 1.0));
        Assert.Equal(1, error.StateIndex);
        Assert.Contains("not bounded", error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void BadPlanckConstantOrOptions_AreRefused()
    {
        Assert.Throws<MechanicsException>(() => LagrangianMechanics.Derive(Oscillator, [1.0], 0));
        Assert.Throws<MechanicsException>(() => LagrangianMechanics.Derive(Oscillator, [1.0], 1, new MechanicsOptions { SearchLow = 2, SearchHigh = 1 }));
        Assert.Throws<MechanicsException>(() => LagrangianMechanics.Derive(Oscillator, [double.NaN], 1));
    }
}
