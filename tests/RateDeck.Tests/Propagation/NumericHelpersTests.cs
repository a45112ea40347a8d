using System.Numerics;
using RateDeck.Propagation;
using Xunit;

namespace RateDeck.Tests.Propagation;

public class NumericHelpersTests
{
    [Theory]
    [InlineData(1e-20)]
    [InlineData(-3e-9)]
    [InlineData(1e-5)]
    [InlineData(-0.4)]
    public void Phi1_MatchesTaylorSeriesNearZero(double z)
    {
        // phi1(z) = (e^z - 1) / z = sum_k z^k / (k + 1)! (the series of the exponential);
        // four terms are exact to double precision for |z| <= 1e-5, twenty for |z| = 0.4.
        var series = 0.0;
        var term = 1.0;
        for (var k = 0; k < 20; k++)
        {
            series += term;
            term *= z / (k + 2);
        }

        Assert.Equal(series, SpectralFunctions.Phi1(z), 15);
        Assert.Equal(series, SpectralFunctions.Phi1(new Complex(z, 0)).Real, 15);
    }

    [Theory]
    [InlineData(-2.0)]
    [InlineData(-50.0)]
    [InlineData(-800.0)]
    [InlineData(3.0)]
    public void Phi1_MatchesDefinitionAwayFromZero(double z)
    {
        // Away from zero (e^z - 1) / z loses nothing to cancellation (|e^z - 1| >= 0.63).
        Assert.Equal((Math.Exp(z) - 1) / z, SpectralFunctions.Phi1(z), 15);
    }

    [Theory]
    [InlineData(0.3, 0.4)]
    [InlineData(-2.0, 5.0)]
    [InlineData(1e-9, -1e-9)]
    public void ComplexPhi1_SatisfiesDefinition(double re, double im)
    {
        // z phi1(z) + 1 = e^z (the definition), checked where the product is well conditioned.
        var z = new Complex(re, im);
        var residual = (z * SpectralFunctions.Phi1(z)) + 1 - Complex.Exp(z);
        Assert.True(Complex.Abs(residual) <= 1e-15 * Math.Max(1, Complex.Abs(Complex.Exp(z))), $"residual {residual}");
    }

    [Fact]
    public void TrajectoryComparison_UsesTheStatedDefinitions()
    {
        // Hand-computed: |a - b| = 0.1 at (t = 1, state 0); entrywise relative 0.1 / 0.5 = 0.2 there,
        // but 1e-300 vs 3e-300 gives 2/3; relative to the total 0.1 / 1.0.
        var a = new Trajectory([0.0, 1.0], [[1.0, 0.0], [0.5, 0.5]]);
        var b = new Trajectory([0.0, 1.0], [[1.0, 0.0], [0.4, 0.5]]);
        var difference = TrajectoryComparison.Compare(a, b);
        Assert.Equal(0.1, difference.MaxAbsolute, 15);
        Assert.Equal(0.2, difference.MaxRelative, 15);
        Assert.Equal(0.1, difference.MaxRelativeToTotal, 15);
        Assert.Equal(1.0, difference.WorstTime);
        Assert.Equal(0, difference.WorstState);

        var tiny = TrajectoryComparison.Compare(new Trajectory([0.0], [[1e-300]]), new Trajectory([0.0], [[3e-300]]));
        Assert.Equal(2.0 / 3.0, tiny.MaxRelative, 12);

        // A state holding 1e-12 of the population, below RelativeFloor (1e-9): left out of the
        // entrywise relative measure, still counted against the total.
        var unresolved = TrajectoryComparison.Compare(new Trajectory([0.0], [[1.0, 1e-12]]), new Trajectory([0.0], [[1.0, 2e-12]]));
        Assert.Equal(0.0, unresolved.MaxRelative);
        Assert.Equal(1e-12, unresolved.MaxRelativeToTotal, 1e-20);
        Assert.Throws<ArgumentException>(() => TrajectoryComparison.Compare(a, new Trajectory([0.0], [[1.0, 0.0]])));
    }
}
