using RateDeck.Decks;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.States;
using RateDeck.Tests.Propagation;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Diagnostics;

public class SparseDiagnosticsTests
{
    [Fact]
    public void BandedKernelDeck_IsStoredSparseAndMatchesDetailedBalanceCompletion()
    {
        // 1200 states with a nearest-neighbour kernel: the assembler must choose sparse storage, and
        // each rate pair must satisfy K_ji = K_ij pi_j / pi_i (the definition of completion, SPEC 2).
        const int n = 1200;
        var coordinates = Enumerable.Range(0, n).Select(i => (double)i).ToArray();
        var energies = coordinates.Select(x => 0.01 * x).ToArray();
        var deck = TestDecks.Create(coordinates, energies, TestDecks.Weights([.. coordinates.Select(_ => 1.0)]),
            new KernelModel("0.5 + 0.001 * x", TransferDirection.TowardSmaller, 1, TestDecks.At(5)));
        var states = StateSpaceBuilder.Build(deck);

        var rates = RateMatrixAssembler.Assemble(deck, states);

        var sparse = Assert.IsType<SparseGenerator>(rates.Sparse);
        Assert.Equal(1, sparse.Bandwidth);
        Assert.Equal((3 * n) - 2, sparse.StoredCount);
        var logPi = states.LogEquilibrium;
        for (var j = 1; j < n; j++)
        {
            var down = sparse[j - 1, j];
            Assert.Equal(0.5 + (0.001 * j), down, 12);
            Assert.Equal(down * Math.Exp(logPi[j] - logPi[j - 1]), sparse[j, j - 1], 1e-12 * down);
        }

        var report = MatrixChecks.Check(rates, new ManagedLinearAlgebra());
        Assert.True(report.Ok, string.Join("; ", report.Failures));
        Assert.Equal(1, report.Spectrum!.NullDimension);
        Assert.Contains("sparse", report.Spectrum.PathReason);
    }

    [Fact]
    public void SparseAndDenseChecks_AgreeOnLadderWithTwoClassesAndALoss()
    {
        // Two ladders with no rate between them, the second leaking: two closed classes, one without
        // loss, so one zero eigenvalue (SPEC 2: null space = closed classes without loss).
        const int n = 40;
        var loss = new double[n];
        loss[n - 1] = 0.2;
        var dense = TestRates.Completed([.. Enumerable.Range(0, n).Select(i => -0.1 * i)], (i, j) => j == i + 1 && i != 19 ? 1.0 + (0.01 * i) : 0.0, loss);
        var sparse = SparseRates.ToSparse(dense);
        var la = new ManagedLinearAlgebra();

        var denseReport = MatrixChecks.Check(dense, la);
        var sparseReport = MatrixChecks.Check(sparse, la);

        Assert.Equal(denseReport.Checks.Select(c => (c.Name, c.Passed)), sparseReport.Checks.Select(c => (c.Name, c.Passed)));
        Assert.Equal(2, sparseReport.Classes.Closed.Count);
        Assert.Equal(1, sparseReport.Spectrum!.NullDimension);
        Assert.Equal(denseReport.ConservationError, sparseReport.ConservationError, 1e-15);
        for (var k = 0; k < n; k++)
        {
            Assert.Equal(denseReport.Spectrum!.Eigenvalues[k], sparseReport.Spectrum.Eigenvalues[k], 1e-12);
        }

        Assert.Equal(denseReport.EquilibriumAgreement[0].MaxDifference!.Value, sparseReport.EquilibriumAgreement[0].MaxDifference!.Value, 1e-12);
        var limits = StepLimits.Analyze(sparseReport.Spectrum, sparse, 10.0, null);
        Assert.Equal(StepLimits.Analyze(denseReport.Spectrum!, dense, 10.0, null).Rk4Stable.MaxStep, limits.Rk4Stable.MaxStep, 1e-12);
    }

    [Fact]
    public void LargeSparseMatrix_RefusesDenseFormWithPlainMessage()
    {
        const int n = DenseStorage.StateLimit + 1;
        var sparse = new SparseGenerator(n, [.. Enumerable.Range(0, n + 1)], [.. Enumerable.Range(0, n)], new double[n]);
        var rates = new RateMatrix(TestRates.States(new double[n]), sparse, new double[n], new double[n], BalanceOrigin.CompletedByDetailedBalance, "sparse (test)");

        var error = Assert.Throws<DenseStorageException>(() => rates.Generator);

        Assert.Contains("dense", error.Message);
    }
}

public class SparseSteadyStateTests
{
    [Fact]
    public void DrivenSparseLadder_SteadyStateMatchesDenseSolveAndBalancesPumping()
    {
        // Pumped at the top, drained at the bottom: P = -K^-1 s (SPEC 2). The banded solve on the
        // sparse form against the dense LU solve, and the residual |K P + s| near rounding.
        const int n = 60;
        var loss = new double[n];
        loss[0] = 0.4;
        var pumping = new double[n];
        pumping[n - 1] = 2.0;
        var dense = SparseRates.Ladder(n, 1.2, slope: 0.05, loss, pumping);
        var sparse = SparseRates.ToSparse(dense);
        var la = new ManagedLinearAlgebra();
        var initial = new double[n];

        var expected = SteadyState.Compute(dense, Spectrum.Compute(dense, la), initial, la);
        var actual = SteadyState.Compute(sparse, Spectrum.Compute(sparse, la), initial, la);

        Assert.Equal(SteadyStateKind.Driven, actual.Kind);
        for (var i = 0; i < n; i++)
        {
            Assert.Equal(expected.Populations![i], actual.Populations![i], 1e-10 * expected.Populations.Max());
        }

        Assert.True(actual.Residual <= 1e-12 * pumping.Sum() * 100, $"residual {actual.Residual}");
    }
}
