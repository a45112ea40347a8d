using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Propagation;

public class SharedDecompositionTests
{
    [Fact]
    public void PropagatorFromSpectrum_SharesTheEigenvectorsAndMatchesCosineExpansion()
    {
        // Reflecting walk with rate r: eigenvalues -2r(1 - cos(pi k / N)), DCT-II eigenvectors
        // (G. Strang, "The discrete cosine transform", SIAM Review 41 (1999) 135).
        const int n = 10;
        const double r = 1.3;
        var rates = TestRates.Completed(new double[n], (i, j) => j == i + 1 ? r : 0.0);
        var la = new ManagedLinearAlgebra();
        var spectrum = Spectrum.Compute(rates, la);
        var initial = new double[n];
        initial[0] = 1.0;

        var chosen = ExactPropagatorChoice.Choose(rates, la, DetailedBalance.Analyze(rates), initial, spectrum);

        var symmetric = Assert.IsType<SymmetricEigenPropagator>(chosen);
        double[] times = [0.0, 0.5, 2.0, 20.0];
        var trajectory = symmetric.Propagate(initial, times);
        for (var m = 0; m < times.Length; m++)
        {
            for (var i = 0; i < n; i++)
            {
                var expected = ReflectingWalk.Population(n, r, 0, i, times[m]);

                Assert.True(Math.Abs(trajectory.Populations[m][i] - expected) <= 1e-13, $"state {i} at t = {times[m]}");
            }
        }

        // The spectrum's eigenvalues are the propagator's (same decomposition, not a second one).
        var values = spectrum.Symmetric!.Values;
        for (var k = 0; k < n; k++)
        {
            Assert.Equal(values[k] >= -symmetric.ZeroTolerance ? 0.0 : values[k], symmetric.Eigenvalues[k]);
        }
    }
}
