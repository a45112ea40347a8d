using System.Numerics;
using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Double;
using ComplexDense = MathNet.Numerics.LinearAlgebra.Complex.DenseMatrix;

namespace RateDeck.LinearAlgebra;

/// <summary>
/// MathNet's managed algorithms: always available, and the reference the native provider must agree with.
/// </summary>
public sealed class ManagedLinearAlgebra : ILinearAlgebra
{
    /// <inheritdoc />
    public string Name => "managed";

    /// <inheritdoc />
    public SymmetricEigenDecomposition SymmetricEigen(DenseMatrix symmetric)
    {
        var evd = symmetric.Evd(Symmetricity.Symmetric);
        var values = evd.EigenValues.Select(v => v.Real).ToArray();
        var order = Enumerable.Range(0, values.Length).OrderBy(k => values[k]).ToArray();
        var vectors = DenseMatrix.Create(symmetric.RowCount, symmetric.ColumnCount, 0.0);
        for (var column = 0; column < order.Length; column++)
        {
            vectors.SetColumn(column, evd.EigenVectors.Column(order[column]));
        }

        return new SymmetricEigenDecomposition(order.Select(k => values[k]).ToArray(), vectors);
    }

    /// <inheritdoc />
    public GeneralEigenDecomposition GeneralEigen(DenseMatrix matrix)
    {
        var evd = matrix.Evd(Symmetricity.Asymmetric);
        var n = matrix.RowCount;
        var values = evd.EigenValues.ToArray();
        var real = evd.EigenVectors;
        var vectors = ComplexDense.Create(n, n, Complex.Zero);

        // MathNet packs a complex pair (a +- ib) as columns a and b, as LAPACK's dgeev does.
        for (var k = 0; k < n; k++)
        {
            if (values[k].Imaginary != 0 && k + 1 < n && values[k + 1] == Complex.Conjugate(values[k]))
            {
                for (var row = 0; row < n; row++)
                {
                    vectors[row, k] = new Complex(real[row, k], real[row, k + 1]);
                    vectors[row, k + 1] = new Complex(real[row, k], -real[row, k + 1]);
                }

                k++;
            }
            else
            {
                for (var row = 0; row < n; row++)
                {
                    vectors[row, k] = real[row, k];
                }
            }
        }

        NormalizeColumns(vectors);
        return new GeneralEigenDecomposition(values, vectors);
    }

    /// <inheritdoc />
    public DenseMatrix Multiply(DenseMatrix a, DenseMatrix b, bool transposeA = false, bool transposeB = false)
    {
        var left = transposeA ? a.Transpose() : a;
        var right = transposeB ? b.Transpose() : b;
        return (DenseMatrix)left.Multiply(right);
    }

    /// <inheritdoc />
    public double[] Multiply(DenseMatrix a, double[] x, bool transposeA = false)
    {
        var vector = MathNet.Numerics.LinearAlgebra.Vector<double>.Build.Dense(x);
        var product = transposeA ? a.TransposeThisAndMultiply(vector) : a.Multiply(vector);
        return product.ToArray();
    }

    /// <inheritdoc />
    public DenseMatrix Solve(DenseMatrix a, DenseMatrix b)
    {
        var lu = a.LU();
        var pivotFloor = a.RowCount * double.Epsilon;
        var diagonal = lu.U.Diagonal();
        var largest = diagonal.AbsoluteMaximum();
        if (largest == 0 || diagonal.AbsoluteMinimum() <= largest * 1e-15 * a.RowCount + pivotFloor)
        {
            throw new SingularMatrixException("the matrix is singular to working precision (LU pivot below n * 1e-15 of the largest)");
        }

        return (DenseMatrix)lu.Solve(b);
    }

    private static void NormalizeColumns(ComplexDense vectors)
    {
        for (var column = 0; column < vectors.ColumnCount; column++)
        {
            var norm = vectors.Column(column).L2Norm();
            if (norm > 0)
            {
                vectors.SetColumn(column, vectors.Column(column) / norm);
            }
        }
    }
}
