using RateDeck.LinearAlgebra;
using Xunit;

namespace RateDeck.Tests.LinearAlgebra;

public class BandEigenvaluesTests
{
    /// <summary>
    /// The generator of the reflecting random walk with rate r on N states, as a symmetric band:
    /// its eigenvalues are -2r(1 - cos(k pi / N)), k = 0..N-1 (G. Strang, "The discrete cosine
    /// transform", SIAM Review 41 (1999) 135).
    /// </summary>
    private static SymmetricBand Walk(int n, double r, int bandwidth = 1)
    {
        var lower = new double[n * (bandwidth + 1)];
        for (var j = 0; j < n; j++)
        {
            lower[j * (bandwidth + 1)] = j == 0 || j == n - 1 ? -r : -2 * r;
            if (j + 1 < n)
            {
                lower[(j * (bandwidth + 1)) + 1] = r;
            }
        }

        return new SymmetricBand(n, bandwidth, lower);
    }

    private static void AssertWalkSpectrum(double[] values, int n, double r)
    {
        var expected = Enumerable.Range(0, n).Select(k => -2 * r * (1 - Math.Cos(k * Math.PI / n))).Order().ToArray();
        for (var k = 0; k < n; k++)
        {
            // Backward-stable eigenvalues err by a small multiple of eps ||T|| = 4r eps.
            Assert.True(Math.Abs(values[k] - expected[k]) <= 1e-12 * r, $"eigenvalue {k}: {values[k]} vs {expected[k]}");
        }
    }

    [Fact]
    public void ManagedQl_ReproducesRandomWalkSpectrum()
    {
        const int n = 1500;
        AssertWalkSpectrum(new ManagedLinearAlgebra().SymmetricBandEigenvalues(Walk(n, 3.0), out var method), n, 3.0);
        Assert.Contains("managed", method);
    }

    [NativeFact]
    public void NativeTridiagonalAndBand_ReproduceRandomWalkSpectrum()
    {
        const int n = 1500;
        AssertWalkSpectrum(NativeLapack.Required.SymmetricBandEigenvalues(Walk(n, 3.0), out var tridiagonal), n, 3.0);
        Assert.Contains("dsterf", tridiagonal);

        // The same matrix stored with a second (empty) band goes through dsbev_.
        AssertWalkSpectrum(NativeLapack.Required.SymmetricBandEigenvalues(Walk(n, 3.0, bandwidth: 2), out var band), n, 3.0);
        Assert.Contains("dsbev", band);
    }
}

public class OverwritingEigenTests
{
    [NativeFact]
    public void OverwritingDecomposition_GivesTheSameEigenpairsAsTheCopyingOne()
    {
        // Second-difference matrix tridiag(-1, 2, -1) of order 50: eigenvalues 2 - 2 cos(k pi / 51)
        // (closed form, common practice); the in-place call must agree with the copying one.
        const int n = 50;
        var a = MathNet.Numerics.LinearAlgebra.Double.DenseMatrix.Create(n, n, (i, j) => i == j ? 2.0 : Math.Abs(i - j) == 1 ? -1.0 : 0.0);
        var copied = NativeLapack.Required.SymmetricEigen(a);

        var overwritten = NativeLapack.Required.SymmetricEigenOverwriting((MathNet.Numerics.LinearAlgebra.Double.DenseMatrix)a.Clone());

        for (var k = 0; k < n; k++)
        {
            Assert.Equal(2 - (2 * Math.Cos((k + 1) * Math.PI / (n + 1))), overwritten.Values[k], 1e-13);
            Assert.Equal(copied.Values[k], overwritten.Values[k]);
        }

        Assert.Equal(copied.Vectors.Values, overwritten.Vectors.Values);
    }
}
