using System.Numerics;
using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using Xunit;

namespace RateDeck.Tests.LinearAlgebra;

/// <summary>Test matrices and the assertions the provider tests share.</summary>
internal static class LinearAlgebraChecks
{
    /// <summary>The unit roundoff of double precision times two, 2^-52 (IEEE 754).</summary>
    public const double MachineEpsilon = 2.220446049250313e-16;

    /// <summary>Entries uniform in [-1, 1), reproducible from the seed.</summary>
    public static DenseMatrix Random(int rows, int columns, int seed)
    {
        var random = new Random(seed);
        return DenseMatrix.Create(rows, columns, (_, _) => 2 * random.NextDouble() - 1);
    }

    /// <summary>(R + R^T) / 2 for a random R: symmetric with a spread, non-degenerate spectrum.</summary>
    public static DenseMatrix RandomSymmetric(int n, int seed)
    {
        var r = Random(n, n, seed);
        return (DenseMatrix)((r + r.Transpose()) * 0.5);
    }

    /// <summary>The tridiagonal second-difference matrix [-1 2 -1] of order n.</summary>
    public static DenseMatrix SecondDifference(int n) =>
        DenseMatrix.Create(n, n, (i, j) => i == j ? 2 : Math.Abs(i - j) == 1 ? -1 : 0);

    public static double SpectralRadius(IEnumerable<double> values) => values.Max(Math.Abs);

    public static void AssertClose(IReadOnlyList<double> expected, IReadOnlyList<double> actual, double tolerance, string what)
    {
        Assert.Equal(expected.Count, actual.Count);
        var worst = expected.Zip(actual, (e, a) => Math.Abs(e - a)).DefaultIfEmpty(0).Max();
        Assert.True(worst <= tolerance, $"{what}: largest difference {worst:E3} exceeds {tolerance:E3}");
    }

    public static void AssertClose(DenseMatrix expected, DenseMatrix actual, double tolerance, string what)
    {
        Assert.Equal(expected.RowCount, actual.RowCount);
        Assert.Equal(expected.ColumnCount, actual.ColumnCount);
        AssertClose(expected.Values, actual.Values, tolerance, what);
    }

    /// <summary>
    /// V orthonormal (|V^T V - I| within n * 1e-14) and A V = V diag(values) to within
    /// n * 1e-14 * spectral radius: backward-stable eigensolvers leave residuals of order n eps |A|
    /// (Golub and Van Loan, Matrix Computations, ch. 8, cited from memory; the constant is common practice).
    /// </summary>
    public static void AssertSymmetricDecomposition(DenseMatrix a, SymmetricEigenDecomposition decomposition)
    {
        var n = a.RowCount;
        var v = decomposition.Vectors;
        var radius = Math.Max(SpectralRadius(decomposition.Values), double.Epsilon);
        Assert.True(decomposition.Values.Zip(decomposition.Values.Skip(1)).All(p => p.First <= p.Second), "eigenvalues must ascend");
        AssertClose(DenseMatrix.CreateIdentity(n), (DenseMatrix)v.TransposeThisAndMultiply(v), n * 1e-14, "V^T V - I");
        var scaled = (DenseMatrix)(v * DenseMatrix.OfDiagonalArray(decomposition.Values));
        AssertClose(scaled, (DenseMatrix)(a * v), n * 1e-14 * radius, "A V - V L");
    }

    /// <summary>
    /// Two orthonormal eigenvector sets of one matrix with distinct eigenvalues agree up to the sign
    /// of each column, i.e. |V1^T V2| is the identity. The error of a computed eigenvector is of order
    /// eps |A| / gap (Davis-Kahan bound), hence the loose 1e-9 for random spectra.
    /// </summary>
    public static void AssertSameVectorsUpToSign(DenseMatrix v1, DenseMatrix v2)
    {
        var overlap = (DenseMatrix)v1.TransposeThisAndMultiply(v2).PointwiseAbs();
        AssertClose(DenseMatrix.CreateIdentity(v1.ColumnCount), overlap, 1e-9, "|V1^T V2| - I");
    }

    /// <summary>Unit columns and A v = lambda v for each pair, within n * 1e-13 of the spectral radius.</summary>
    public static void AssertGeneralDecomposition(DenseMatrix a, GeneralEigenDecomposition decomposition)
    {
        var n = a.RowCount;
        var radius = Math.Max(decomposition.Values.Max(Complex.Abs), double.Epsilon);
        var complexA = a.ToComplex();
        for (var k = 0; k < n; k++)
        {
            var v = decomposition.Vectors.Column(k);
            Assert.Equal(1.0, v.L2Norm(), 1e-13);
            var residual = (complexA * v - v * decomposition.Values[k]).L2Norm();
            Assert.True(residual <= n * 1e-13 * radius, $"eigenpair {k}: |A v - lambda v| = {residual:E3}");
        }
    }

    /// <summary>Each eigenvector of one result is the other's up to a complex phase: |v1^H v2| = 1 for unit vectors.</summary>
    public static void AssertSameVectorsUpToPhase(GeneralEigenDecomposition first, GeneralEigenDecomposition second, double tolerance)
    {
        for (var k = 0; k < first.Values.Length; k++)
        {
            var overlap = first.Vectors.Column(k).ConjugateDotProduct(second.Vectors.Column(k)).Magnitude;
            Assert.True(Math.Abs(overlap - 1) <= tolerance, $"eigenvector {k}: |v1^H v2| = {overlap:R}");
        }
    }

    public static void AssertSameValues(IReadOnlyList<Complex> expected, IReadOnlyList<Complex> actual, double tolerance)
    {
        Assert.Equal(expected.Count, actual.Count);
        for (var k = 0; k < expected.Count; k++)
        {
            var difference = Complex.Abs(expected[k] - actual[k]);
            Assert.True(difference <= tolerance, $"eigenvalue {k}: {expected[k]} vs {actual[k]} (difference {difference:E3})");
        }
    }
}
