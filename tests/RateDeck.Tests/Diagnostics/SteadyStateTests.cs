using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using Xunit;

namespace RateDeck.Tests.Diagnostics;

public class SteadyStateTests
{
    private static readonly ILinearAlgebra _algebra = new ManagedLinearAlgebra();

    private static SteadyStateResult Solve(RateMatrix rates, double[] initial) =>
        SteadyState.Compute(rates, Spectrum.Compute(rates, _algebra), initial, _algebra);

    [Fact]
    public void ReducibleMatrix_EqualsTheProjectionComputedByHand()
    {
        var rates = TestMatrices.FromFixture("reducible5");
        var initial = TestMatrices.Doubles(TestMatrices.Case("reducible5"), "initial");

        var result = Solve(rates, initial);

        // By hand: r4 leaves at rate 1 + 3, to r0 with probability 1/4 and to r2 with 3/4.
        // Class {r0, r1}: 0 -> 1 at 2, 1 -> 0 at 1, so pi = (1/3, 2/3); mass 0.1 + 0.2 + 0.25/4 = 0.3625.
        // Class {r2, r3}: 2 -> 3 at 0.5, 3 -> 2 at 1.5, so pi = (3/4, 1/4); mass 0.3 + 0.15 + 0.75 * 0.25 = 0.6375.
        double[] expected = [0.3625 / 3, 0.3625 * 2 / 3, 0.6375 * 3 / 4, 0.6375 / 4, 0];
        Assert.Equal(SteadyStateKind.Undriven, result.Kind);
        Assert.Equal(["r4"], result.TransientLabels);
        Assert.Equal(0.25, result.AbsorptionProbabilities[0][0], 1e-15);
        Assert.Equal(0.75, result.AbsorptionProbabilities[0][1], 1e-15);
        Assert.Equal([0.3625, 0.6375], result.ClassMasses.Select(m => Math.Round(m.Mass, 14)));
        for (var i = 0; i < expected.Length; i++)
        {
            Assert.Equal(expected[i], result.Populations![i], 1e-14);
        }

        // Independently, the long-time limit exp(K t) P(0) from scipy.linalg.expm at t = 200 (fixture).
        var limit = TestMatrices.Doubles(TestMatrices.Case("reducible5"), "limit_populations");
        for (var i = 0; i < limit.Length; i++)
        {
            Assert.Equal(limit[i], result.Populations![i], 1e-12);
        }

        Assert.Equal(0, result.LostMass!.Value, 1e-15);
        Assert.True(result.Residual <= 1e-15);
        // Slowest decay: class {r2, r3} relaxes at 0.5 + 1.5 = 2 (by hand; eigenvalue -2 in the SciPy fixture).
        Assert.Equal(1.0 / 2, result.ApproachTime, 1e-12);
    }

    [Fact]
    public void DrivenTwoState_EqualsTheClosedForm()
    {
        // K = [[-(a + l0), b], [a, -(b + l1)]], s = (s0, 0). Solving K P = -s by Cramer's rule (by hand):
        // det = (a + l0)(b + l1) - a b, P0 = (b + l1) s0 / det, P1 = a s0 / det.
        const double a = 2.0, b = 0.5, l0 = 0.1, l1 = 0.3, s0 = 1.5;
        var rateTable = new double[2, 2];
        rateTable[1, 0] = a;
        rateTable[0, 1] = b;
        var rates = TestMatrices.FromRates(rateTable, loss: [l0, l1], pumping: [s0, 0]);
        var det = ((a + l0) * (b + l1)) - (a * b);

        var result = Solve(rates, [0, 0]);

        Assert.Equal(SteadyStateKind.Driven, result.Kind);
        Assert.Equal((b + l1) * s0 / det, result.Populations![0], 1e-13);
        Assert.Equal(a * s0 / det, result.Populations[1], 1e-13);
        Assert.True(result.Residual <= 1e-14);
        Assert.Null(result.LostMass);
    }

    [Fact]
    public void DrivenWithoutLosses_SaysNoSteadyStateExists()
    {
        // Pumping into a conserving class: total mass grows as s t, so no steady state (SPEC 2).
        var walk = TestMatrices.RandomWalk(3, 1.0);
        var pumped = TestMatrices.Wrap(walk.Generator, walk.States.LogWeights, walk.Origin, walk.Loss, [0, 0.4, 0], walk.States.Labels);

        var result = Solve(pumped, [1, 0, 0]);

        Assert.Equal(SteadyStateKind.None, result.Kind);
        Assert.False(result.Exists);
        Assert.Null(result.Populations);
        Assert.Contains("grows linearly", result.Message);
        Assert.Contains("at 0.4 per unit time", result.Message);
    }

    [Fact]
    public void PumpedLeakingStateBesideAConservedClass_CombinesBothByHand()
    {
        // s0 is isolated, pumped at 0.6 and drained at 0.2: steady P0 = 0.6 / 0.2 = 3 (by hand).
        // {s1, s2} (1 -> 2 at 1, 2 -> 1 at 3, so pi = (3/4, 1/4)) is closed, unpumped and keeps its initial mass 0.8.
        var rateTable = new double[3, 3];
        rateTable[2, 1] = 1;
        rateTable[1, 2] = 3;
        var rates = TestMatrices.FromRates(rateTable, loss: [0.2, 0, 0], pumping: [0.6, 0, 0]);

        var result = Solve(rates, [5, 0.8, 0]);

        Assert.Equal(SteadyStateKind.Driven, result.Kind);
        Assert.Equal(3, result.Populations![0], 1e-14);
        Assert.Equal(0.6, result.Populations[1], 1e-14);
        Assert.Equal(0.2, result.Populations[2], 1e-14);
    }

    [Fact]
    public void RandomWalk_SettlesUniformly_WithAllItsMass()
    {
        // Uniform stationary law of the reflecting walk (path-graph Laplacian null vector; Strang, SIAM Review 41 (1999) 135).
        var rates = TestMatrices.RandomWalk(8, 0.7);
        var result = Solve(rates, [0.5, 0, 0, 1.5, 0, 0, 0, 0]);

        Assert.All(result.Populations!, p => Assert.Equal(2.0 / 8, p, 1e-15));
        Assert.Equal(1 / (2 * 0.7 * (1 - Math.Cos(Math.PI / 8))), result.ApproachTime, 1e-12);
    }
}
