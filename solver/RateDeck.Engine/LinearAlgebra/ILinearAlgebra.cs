using System.Numerics;
using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.LinearAlgebra;

/// <summary>
/// The dense linear algebra the pipeline needs, behind one boundary so that the managed
/// implementation and a native LAPACK/BLAS one can be swapped. Both must give the same answers
/// to rounding. Matrices are MathNet dense matrices (column-major storage, as LAPACK expects).
/// Inputs are never modified, except by <see cref="SymmetricEigenOverwriting"/>.
/// </summary>
public interface ILinearAlgebra
{
    /// <summary>A short name for summaries, e.g. "managed" or "native (libopenblas.so.0)".</summary>
    string Name { get; }

    /// <summary>
    /// Eigen-decomposition of a real symmetric matrix: A = V diag(values) V^T, values ascending.
    /// Each eigenvector's sign is arbitrary, and within a repeated eigenvalue only the eigenspace is determined.
    /// </summary>
    SymmetricEigenDecomposition SymmetricEigen(DenseMatrix symmetric);

    /// <summary>
    /// As <see cref="SymmetricEigen"/> for a matrix built only to be decomposed: the provider may
    /// work in its storage, which is then undefined (one N x N copy fewer where it can).
    /// </summary>
    SymmetricEigenDecomposition SymmetricEigenOverwriting(DenseMatrix symmetric);

    /// <summary>
    /// All eigenvalues, ascending, of a symmetric band matrix without eigenvectors, in O(N) or
    /// O(N b) memory where the provider can; <paramref name="method"/> names the routine used.
    /// </summary>
    /// <exception cref="DenseStorageException">The provider needs a dense copy above <see cref="DenseStorage.StateLimit"/> states.</exception>
    double[] SymmetricBandEigenvalues(SymmetricBand band, out string method);

    /// <summary>
    /// Eigenvalues and right eigenvectors of a general real matrix, sorted by ascending real part, then
    /// ascending imaginary part (so a conjugate pair is listed a - ib, a + ib). Eigenvectors have unit
    /// 2-norm and are determined up to a complex phase.
    /// </summary>
    GeneralEigenDecomposition GeneralEigen(DenseMatrix matrix);

    /// <summary>C = op(A) op(B), op being the transpose when asked.</summary>
    DenseMatrix Multiply(DenseMatrix a, DenseMatrix b, bool transposeA = false, bool transposeB = false);

    /// <summary>y = op(A) x.</summary>
    double[] Multiply(DenseMatrix a, double[] x, bool transposeA = false);

    /// <summary>Solves A X = B by LU with partial pivoting; throws <see cref="SingularMatrixException"/> when A is singular.</summary>
    DenseMatrix Solve(DenseMatrix a, DenseMatrix b);
}

/// <summary>A = V diag(Values) V^T with orthonormal V; values ascending.</summary>
public sealed record SymmetricEigenDecomposition(double[] Values, DenseMatrix Vectors);

/// <summary>A V = V diag(Values), eigenvectors as the columns of <see cref="Vectors"/> (unit 2-norm).</summary>
public sealed record GeneralEigenDecomposition(Complex[] Values, MathNet.Numerics.LinearAlgebra.Complex.DenseMatrix Vectors);

/// <summary>A solve met a matrix that is singular to working precision.</summary>
public sealed class SingularMatrixException : Exception
{
    /// <summary>Creates the exception with a plain message.</summary>
    public SingularMatrixException(string message) : base(message) { }
}
