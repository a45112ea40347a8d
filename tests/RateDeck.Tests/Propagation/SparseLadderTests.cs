using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.Tests.LinearAlgebra;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Propagation;

public class SparseLadderTests
{
    [Fact]
    public void ContourPath_MatchesCosineExpansionOfReflectingWalk()
    {
        // Reflecting walk with rate r on N states: eigenvalues -2r(1 - cos(pi k / N)), DCT-II
        // eigenvectors cos(pi k (i + 1/2) / N), |v_0|^2 = N, |v_k|^2 = N / 2 (G. Strang, "The
        // discrete cosine transform", SIAM Review 41 (1999) 135).
        const int n = 60;
        const double r = 2.0;
        const int start = 7;
        var rates = SparseRates.ToSparse(SparseRates.Ladder(n, r));
        var initial = new double[n];
        initial[start] = 1.0;
        double[] times = [0.0, 0.01, 0.5, 3.0, 40.0, 2000.0];

        var trajectory = new ContourExponentialPropagator(rates).Propagate(initial, times);

        for (var m = 0; m < times.Length; m++)
        {
            for (var i = 0; i < n; i++)
            {
                var expected = ReflectingWalk.Population(n, r, start, i, times[m]);

                Assert.True(Math.Abs(trajectory.Populations[m][i] - expected) <= 1e-12, $"state {i} at t = {times[m]}: {trajectory.Populations[m][i]} vs {expected}");
            }
        }
    }

    [Fact]
    public void SparseAndDensePaths_AgreeOnDrivenTiltedLadder_ExactAndExplicit()
    {
        // A ladder whose pi spans 5 decades, with a sink at the bottom and pumping at the top: the
        // contour path on the sparse form against the symmetric eigen path on the dense form
        // (independent algorithms), and RK4 on both storages (same method, O(nnz) against O(N^2)).
        const int n = 80;
        var loss = new double[n];
        loss[0] = 0.3;
        var pumping = new double[n];
        pumping[n - 1] = 0.05;
        var dense = SparseRates.Ladder(n, 1.5, slope: 5 * Math.Log(10) / (n - 1), loss, pumping);
        var sparse = SparseRates.ToSparse(dense);
        var initial = Enumerable.Range(0, n).Select(i => i < 10 ? 0.1 : 0.0).ToArray();
        double[] times = [0.0, 0.2, 1.0, 5.0, 30.0, 300.0];

        var exactDense = new SymmetricEigenPropagator(dense, new ManagedLinearAlgebra()).Propagate(initial, times);
        var exactSparse = ExactPropagatorChoice.Choose(sparse, new ManagedLinearAlgebra(), initial: initial);
        Assert.IsType<ContourExponentialPropagator>(exactSparse);
        AssertClose(exactDense, exactSparse.Propagate(initial, times), 1e-10);

        AssertClose(new RungeKutta4Propagator(dense, 0.01).Propagate(initial, times), new RungeKutta4Propagator(sparse, 0.01).Propagate(initial, times), 1e-12);
        AssertClose(new ForwardEulerPropagator(dense, 0.01).Propagate(initial, times), new ForwardEulerPropagator(sparse, 0.01).Propagate(initial, times), 1e-12);
    }

    [NativeFact]
    public void ContourPath_AgreesWithNativeEigenPath()
    {
        // The managed sparse path against the dense symmetric path through native LAPACK (dsyevd_).
        const int n = 300;
        var dense = SparseRates.Ladder(n, 0.8, slope: 0.02);
        var sparse = SparseRates.ToSparse(dense);
        var initial = new double[n];
        initial[n / 2] = 1.0;
        double[] times = [0.1, 10.0, 1000.0, 1e5];

        var native = new SymmetricEigenPropagator(dense, NativeLapack.Required).Propagate(initial, times);
        AssertClose(native, new ContourExponentialPropagator(sparse).Propagate(initial, times), 1e-10);
    }

    [Fact]
    public void ContourNodes_ReproduceScalarExponential()
    {
        // e^x against the quadrature sum_k Im[w_k / (z_k - x)] on [-1e6, 0] (Trefethen, Weideman and
        // Schmelzer, BIT 46 (2006) 653): the uniform error the propagator's accuracy rests on.
        var (nodes, weights) = ContourExponentialPropagator.Contour(ContourExponentialPropagator.NodeCount);
        for (var e = -8.0; e <= 6.0; e += 0.05)
        {
            var x = -Math.Pow(10, e);
            var sum = 0.0;
            for (var k = 0; k < nodes.Length; k++)
            {
                sum += (weights[k] / (nodes[k] - x)).Imaginary;
            }

            Assert.True(Math.Abs(sum - Math.Exp(x)) <= ContourExponentialPropagator.ApproximationError, $"x = {x}: {sum} vs {Math.Exp(x)}");
        }
    }

    private static void AssertClose(Trajectory expected, Trajectory actual, double tolerance)
    {
        for (var m = 0; m < expected.Times.Length; m++)
        {
            for (var i = 0; i < expected.Populations[m].Length; i++)
            {
                Assert.True(
                    Math.Abs(expected.Populations[m][i] - actual.Populations[m][i]) <= tolerance,
                    $"state {i} at t = {expected.Times[m]}: {expected.Populations[m][i]} vs {actual.Populations[m][i]}");
            }
        }
    }
}
