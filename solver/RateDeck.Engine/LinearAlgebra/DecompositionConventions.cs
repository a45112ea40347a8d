using System.Numerics;
using ComplexDense = MathNet.Numerics.LinearAlgebra.Complex.DenseMatrix;

namespace RateDeck.LinearAlgebra;

/// <summary>
/// The output conventions every <see cref="ILinearAlgebra"/> provider shares, kept in one place so
/// that the managed and the native provider give the same answers, not merely equivalent ones.
/// </summary>
internal static class DecompositionConventions
{
    /// <summary>
    /// A pivot of the LU factor U counts as zero below this multiple of n times the largest pivot.
    /// Partial pivoting gives both providers the same U up to rounding, so they refuse the same matrices.
    /// </summary>
    private const double _relativePivotFloor = 1e-15;

    /// <summary>
    /// Builds the general eigen-decomposition from the packed real form that LAPACK's dgeev and
    /// MathNet both return: a conjugate pair a +- ib (b &gt; 0 first) occupies columns k and k + 1 of
    /// <paramref name="packedVectors"/> (column-major, n x n) as the real and imaginary parts of the
    /// eigenvector of a + ib. Columns are scaled to unit 2-norm and sorted by ascending real part,
    /// then ascending imaginary part, so that both providers list the spectrum in one order.
    /// </summary>
    public static GeneralEigenDecomposition FromPacked(double[] real, double[] imaginary, double[] packedVectors, int n)
    {
        var values = new Complex[n];
        var columns = new Complex[n][];
        for (var k = 0; k < n; k++)
        {
            values[k] = new Complex(real[k], imaginary[k]);
            var isPair = imaginary[k] > 0 && k + 1 < n && real[k + 1] == real[k] && imaginary[k + 1] == -imaginary[k];
            if (isPair)
            {
                columns[k] = new Complex[n];
                columns[k + 1] = new Complex[n];
                for (var row = 0; row < n; row++)
                {
                    var re = packedVectors[k * n + row];
                    var im = packedVectors[(k + 1) * n + row];
                    columns[k][row] = new Complex(re, im);
                    columns[k + 1][row] = new Complex(re, -im);
                }

                values[k + 1] = Complex.Conjugate(values[k]);
                k++;
            }
            else
            {
                columns[k] = new Complex[n];
                for (var row = 0; row < n; row++)
                {
                    columns[k][row] = packedVectors[k * n + row];
                }
            }
        }

        var order = Enumerable.Range(0, n)
            .OrderBy(k => values[k].Real)
            .ThenBy(k => values[k].Imaginary)
            .ToArray();
        var storage = new Complex[n * n];
        for (var column = 0; column < n; column++)
        {
            var source = columns[order[column]];
            var norm = Math.Sqrt(source.Sum(z => z.Real * z.Real + z.Imaginary * z.Imaginary));
            var scale = norm > 0 ? 1 / norm : 1;
            for (var row = 0; row < n; row++)
            {
                storage[column * n + row] = source[row] * scale;
            }
        }

        return new GeneralEigenDecomposition(order.Select(k => values[k]).ToArray(), new ComplexDense(n, n, storage));
    }

    /// <summary>
    /// Throws <see cref="SingularMatrixException"/> when the smallest LU pivot is at most
    /// n * 1e-15 of the largest (or zero): the solve would amplify rounding beyond use.
    /// </summary>
    public static void ThrowIfSingular(IReadOnlyList<double> pivots)
    {
        var n = pivots.Count;
        var largest = pivots.Max(Math.Abs);
        var smallest = pivots.Min(Math.Abs);
        if (largest == 0 || smallest <= largest * _relativePivotFloor * n + n * double.Epsilon)
        {
            throw new SingularMatrixException("the matrix is singular to working precision (LU pivot below n * 1e-15 of the largest)");
        }
    }
}
