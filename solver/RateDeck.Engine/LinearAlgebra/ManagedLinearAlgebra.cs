using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Double;

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
        // MathNet does not scale as LAPACK does: entries near 1e308 would overflow its sums of squares.
        var (prepared, scale) = EigenScaling.ForManagedSolver(symmetric);
        var evd = prepared.Evd(Symmetricity.Symmetric);
        var values = evd.EigenValues.Select(v => v.Real / scale).ToArray();
        var order = Enumerable.Range(0, values.Length).OrderBy(k => values[k]).ToArray();
        var vectors = DenseMatrix.Create(symmetric.RowCount, symmetric.ColumnCount, 0.0);
        for (var column = 0; column < order.Length; column++)
        {
            vectors.SetColumn(column, evd.EigenVectors.Column(order[column]));
        }

        return new SymmetricEigenDecomposition(order.Select(k => values[k]).ToArray(), vectors);
    }

    /// <inheritdoc />
    public SymmetricEigenDecomposition SymmetricEigenOverwriting(DenseMatrix symmetric) => SymmetricEigen(symmetric);

    /// <inheritdoc />
    public double[] SymmetricBandEigenvalues(SymmetricBand band, out string method) => BandEigenvalues.Managed(band, this, out method);

    /// <inheritdoc />
    public GeneralEigenDecomposition GeneralEigen(DenseMatrix matrix)
    {
        var (prepared, scale) = EigenScaling.ForManagedSolver(matrix);
        var evd = prepared.Evd(Symmetricity.Asymmetric);
        var values = evd.EigenValues.Select(v => v / scale).ToArray();
        return DecompositionConventions.FromPacked(
            values.Select(v => v.Real).ToArray(),
            values.Select(v => v.Imaginary).ToArray(),
            evd.EigenVectors.ToColumnMajorArray(),
            matrix.RowCount);
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
        DecompositionConventions.ThrowIfSingular(lu.U.Diagonal().ToArray());
        return (DenseMatrix)lu.Solve(b);
    }
}
