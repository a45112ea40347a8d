using RateDeck.Propagation;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Propagation;

public class ReflectingRandomWalkTests
{
    [Fact]
    public void RandomWalk_MatchesCosineEigenExpansion()
    {
        // Symmetric nearest-neighbour walk with rate r on N states and reflecting ends:
        // K = -r L with L the Laplacian of the path graph (free ends). Its eigenvectors are the
        // DCT-II vectors v_k(i) = cos(pi k (i + 1/2) / N), eigenvalues -r (2 - 2 cos(pi k / N)),
        // |v_0|^2 = N and |v_k|^2 = N / 2 (G. Strang, "The discrete cosine transform",
        // SIAM Review 41 (1999) 135). So P_i(t) = sum_k e^(l_k t) v_k(i) (v_k . P(0)) / |v_k|^2.
        const int n = 12;
        const double r = 0.7;
        const int start = 2;
        var rates = TestRates.Completed(new double[n], (i, j) => j == i + 1 ? r : 0.0);
        double[] times = [0.0, 0.3, 1.0, 3.0, 10.0, 100.0];
        var initial = new double[n];
        initial[start] = 1.0;

        var propagators = TestRates.ExactPaths(rates).Append(new RungeKutta4Propagator(rates, 1e-2));
        foreach (var propagator in propagators)
        {
            var tolerance = propagator is FixedStepPropagator ? 1e-8 : 1e-13;
            var trajectory = propagator.Propagate(initial, times);
            for (var m = 0; m < times.Length; m++)
            {
                for (var i = 0; i < n; i++)
                {
                    var expected = ReflectingWalk.Population(n, r, start, i, times[m]);

                    Assert.True(
                        Math.Abs(trajectory.Populations[m][i] - expected) <= tolerance,
                        $"{propagator.Name} state {i} at t = {times[m]}: {trajectory.Populations[m][i]} vs {expected}");
                }
            }
        }
    }
}
