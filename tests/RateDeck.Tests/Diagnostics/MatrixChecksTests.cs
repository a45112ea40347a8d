using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using Xunit;

namespace RateDeck.Tests.Diagnostics;

public class MatrixChecksTests
{
    private static readonly ILinearAlgebra _algebra = new ManagedLinearAlgebra();

    [Fact]
    public void CompletedBalancedMatrix_PassesEveryCheck()
    {
        // The 4-state matrix completed from pi in the SciPy fixture script; pi against the null vector
        // is the fixture's null_space result (Debian SciPy).
        var report = MatrixChecks.Check(TestMatrices.FromFixture("balanced4"), _algebra);

        Assert.True(report.Ok, string.Join("; ", report.Failures));
        Assert.True(report.Balance.PairViolation <= DetailedBalance.PairTolerance);
        Assert.Null(report.Balance.CycleViolation);
        Assert.NotNull(report.Balance.WorstPair);
        Assert.Equal(1, report.ExpectedNullDimension);
        Assert.True(report.EquilibriumAgreement.Single().MaxDifference <= 1e-12);
    }

    [Fact]
    public void Kolmogorov_BalancedMatrixTakenAsGiven_Passes()
    {
        // Kolmogorov, Math. Ann. 112 (1936) 155: detailed balance holds iff every cycle's forward
        // and backward rate products agree. A matrix built with detailed balance must pass.
        var report = MatrixChecks.Check(TestMatrices.FromFixture("balanced4", BalanceOrigin.TakenAsGiven), _algebra);

        Assert.True(report.Balance.Holds);
        Assert.Equal(3, report.Balance.CycleCount); // complete graph on 4 states: 6 edges - 3 tree edges
        Assert.True(report.Balance.CycleViolation <= 1e-12);
        Assert.True(report.Ok, string.Join("; ", report.Failures));
    }

    [Fact]
    public void Kolmogorov_PerturbedCycle_ReportsTheLogRatioOfItsProducts()
    {
        // Multiply the rate b2 -> b0 (K[0, 2]) by 1.5 and keep the column conserving.
        var balanced = TestMatrices.FromFixture("balanced4");
        var k = DenseMatrix.OfMatrix(balanced.Generator);
        var extra = 0.5 * k[0, 2];
        k[0, 2] += extra;
        k[2, 2] -= extra;
        var perturbed = TestMatrices.Wrap(k, balanced.States.LogWeights, BalanceOrigin.TakenAsGiven, balanced.Loss, balanced.Pumping, balanced.States.Labels);

        var report = MatrixChecks.Check(perturbed, _algebra);

        // By hand: around b0 -> b1 -> b2 -> b0 the forward product is K10 K21 K02 and the backward
        // product K01 K12 K20; after the perturbation their log-ratio is ln 1.5.
        var byHand = Math.Log(k[1, 0] * k[2, 1] * k[0, 2] / (k[0, 1] * k[1, 2] * k[2, 0]));
        Assert.Equal(Math.Log(1.5), byHand, 1e-12);
        Assert.Equal(Math.Abs(byHand), report.Balance.CycleViolation!.Value, 1e-12);
        Assert.False(report.Balance.Holds);
        Assert.False(report.Ok);
        Assert.Contains(report.Failures, f => f.StartsWith("detailed balance:", StringComparison.Ordinal));

        // The reported cycle closes through the perturbed pair, and its own products give the same ratio.
        var cycle = report.Balance.WorstCycle.Select(label => Array.IndexOf(perturbed.States.Labels, label)).ToArray();
        Assert.Contains(0, cycle);
        Assert.Contains(2, cycle);
        double forward = 1, backward = 1;
        for (var step = 0; step < cycle.Length; step++)
        {
            var (from, to) = (cycle[step], cycle[(step + 1) % cycle.Length]);
            forward *= k[to, from];
            backward *= k[from, to];
        }

        Assert.Equal(report.Balance.CycleViolation!.Value, Math.Abs(Math.Log(forward / backward)), 1e-12);
    }

    [Fact]
    public void CyclicMatrix_FailsDetailedBalance_ButItsUniformLawMatchesTheDeck()
    {
        // Ring with rates a one way and b the other: the only cycle gives |ln(a^3 / b^3)| (by hand),
        // while the circulant's stationary law is uniform (common practice), as the deck says.
        var report = MatrixChecks.Check(TestMatrices.FromFixture("cyclic3"), _algebra);

        Assert.Equal(Math.Log(Math.Pow(2.0 / 0.5, 3)), report.Balance.CycleViolation!.Value, 1e-12);
        Assert.Equal(3, report.Balance.WorstCycle.Count);
        Assert.Equal(["detailed balance"], report.Checks.Where(c => !c.Passed).Select(c => c.Name));
    }

    [Fact]
    public void ReducibleMatrix_ReportsClassesTransientStateAndOneWayEdges()
    {
        // Classes and null space against the SciPy fixture (csgraph strong components, null_space).
        var report = MatrixChecks.Check(TestMatrices.FromFixture("reducible5"), _algebra);

        Assert.Equal([["r0", "r1"], ["r2", "r3"]], report.Classes.Closed.Select(c => c.Labels));
        Assert.Equal(["r4"], report.Classes.TransientLabels);
        Assert.Equal(2, report.Spectrum!.NullDimension);
        Assert.True(report.Checks.Single(c => c.Name == "null space").Passed);

        // r4 feeds r0 and r2 with nothing back: two one-way edges, detailed balance fails outright.
        Assert.Equal(2, report.Balance.OneWayCount);
        Assert.Equal([("r4", "r0"), ("r4", "r2")], report.Balance.OneWayEdges.Select(e => (e.From, e.To)).Order());
        Assert.False(report.Balance.Holds);

        // The deck's uniform pi is not the stationary law (1/3, 2/3) of class {r0, r1}: |1/2 - 1/3| = 1/6 by hand.
        Assert.Equal(1.0 / 6, report.EquilibriumAgreement[0].MaxDifference!.Value, 1e-12);
        Assert.Contains(report.Failures, f => f.StartsWith("equilibrium:", StringComparison.Ordinal));
    }

    [Fact]
    public void NegativeRateAndBrokenColumn_AreReportedWithStateLabels()
    {
        // Definitions of SPEC 2 (off-diagonal rates >= 0, columns sum to minus the loss): common practice.
        var k = DenseMatrix.OfArray(new[,]
        {
            { -1.0, 0.5, 0.2 },
            { 1.0, -0.5, -0.3 },
            { 0.0, 0.0, 0.0 },
        });
        var rates = TestMatrices.Wrap(k, new double[3], BalanceOrigin.TakenAsGiven, new double[3], new double[3], ["a", "b", "c"]);

        var report = MatrixChecks.Check(rates, _algebra);

        Assert.Equal(1, report.NegativeOffDiagonalCount);
        Assert.Equal(new RateEntry("c", "b", -0.3), report.WorstNegative);
        // Column c sums to 0.2 - 0.3 = -0.1, against max|K_jj| = 1 (by hand).
        Assert.Equal(0.1, report.ConservationError, 1e-15);
        Assert.Equal("c", report.WorstConservationState);
        Assert.Contains(report.Failures, f => f.StartsWith("non-negative rates:", StringComparison.Ordinal) && f.Contains("from c to b"));
        Assert.Contains(report.Failures, f => f.StartsWith("conservation:", StringComparison.Ordinal));
    }

    [Fact]
    public void CouplingBelowDoublePrecision_IsResolvedInDoubleDouble()
    {
        // Two 2-state blocks joined both ways by eps = 1e-17: one closed class. In double the slow
        // mode falls below the zero tolerance (two zeros); the spectrum then goes to double-double.
        // Its rate is the small root of mu^2 - (2 + 2 eps) mu + 2 eps = 0 (the antisymmetric mode
        // (a, b, -b, -a) of the path Laplacian with weights 1, eps, 1, derived by hand):
        // 4 eps / (2 + 2 eps + sqrt(4 + 4 eps^2)) = 1e-17 to 1e-17 relative.
        var rates = new double[4, 4];
        rates[1, 0] = rates[0, 1] = 1;
        rates[3, 2] = rates[2, 3] = 1;
        rates[2, 1] = rates[1, 2] = 1e-17;
        var report = MatrixChecks.Check(TestMatrices.FromRates(rates, origin: BalanceOrigin.CompletedByDetailedBalance), _algebra);

        Assert.Single(report.Classes.Closed);
        Assert.Equal(1, report.Spectrum!.NullDimension);
        Assert.NotNull(report.Spectrum.Extended);
        Assert.Equal(1e-17, report.Spectrum.SlowestRate!.Value, 1e-27);
        Assert.True(report.Ok, string.Join("; ", report.Failures));
    }

    [Fact]
    public void LossInTheOnlyClass_ExpectsNoNullSpace()
    {
        // A leaking irreducible generator is non-singular (irreducibly diagonally dominant; Varga,
        // Matrix Iterative Analysis, 2nd ed., sec. 1.5, from memory): no zero eigenvalue expected.
        var walk = TestMatrices.RandomWalk(6, 1.0);
        var loss = new double[6];
        loss[5] = 0.2;
        var k = DenseMatrix.OfMatrix(walk.Generator);
        k[5, 5] -= 0.2;
        var leaking = TestMatrices.Wrap(k, walk.States.LogWeights, walk.Origin, loss, walk.Pumping, walk.States.Labels);

        var report = MatrixChecks.Check(leaking, _algebra);

        Assert.True(report.Classes.Closed.Single().HasLoss);
        Assert.Equal(0, report.ExpectedNullDimension);
        Assert.Equal(0, report.Spectrum!.NullDimension);
        Assert.True(report.Ok, string.Join("; ", report.Failures));
    }

    [Fact]
    public void NonFiniteRate_FailsWithoutComputingTheSpectrum()
    {
        var walk = TestMatrices.RandomWalk(3, 1.0);
        var k = DenseMatrix.OfMatrix(walk.Generator);
        k[0, 1] = double.NaN;
        var broken = TestMatrices.Wrap(k, walk.States.LogWeights, walk.Origin, walk.Loss, walk.Pumping, walk.States.Labels);

        var report = MatrixChecks.Check(broken, _algebra);

        Assert.Null(report.Spectrum);
        Assert.Equal(1, report.NonFiniteCount);
        Assert.Contains(report.Failures, f => f.StartsWith("finite entries:", StringComparison.Ordinal));
        Assert.Throws<ArgumentException>(() => Spectrum.Compute(broken, _algebra));
    }

    [Fact]
    public void CompletedMatrix_WithUnderflowedPartner_IsNotAOneWayEdge()
    {
        // pi ratio e^-800: completing K_10 = K_01 pi_1 / pi_0 underflows to 0 in double; the pair
        // cannot be resolved and must not count as a broken balance (log-space completion, SPEC 2).
        var rates = new double[2, 2];
        rates[0, 1] = 1.0;
        var report = MatrixChecks.Check(TestMatrices.FromRates(rates, [800.0, 0.0], BalanceOrigin.CompletedByDetailedBalance), _algebra);

        Assert.Equal(0, report.Balance.OneWayCount);
        Assert.True(report.Balance.Holds);
    }
}
