using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.LinearAlgebra;

/// <summary>
/// A tiny check that a loaded library computes, with the calling convention assumed, what it should:
/// one small problem per routine with answers known by hand. A wrong ABI (integer width, argument
/// order) shows up here as a wrong number instead of as a wrong physics result later.
/// </summary>
internal static class NativeSelfCheck
{
    private const double _tolerance = 1e-12;

    /// <summary>Returns null when every answer is right, else what went wrong.</summary>
    public static string? Run(ILinearAlgebra provider)
    {
        try
        {
            return Check(provider);
        }
        catch (Exception error) when (error is ArithmeticException or InvalidOperationException or ArgumentException)
        {
            return error.Message;
        }
    }

    /// <summary>The band eigenvalue routines (dsterf_, dsbev_) on the second-difference matrix of order 3; null when right.</summary>
    public static string? RunBand(OpenBlasLinearAlgebra native)
    {
        try
        {
            // Eigenvalues 2 - 2 cos(k pi / 4) of tridiag(-1, 2, -1), closed form (common practice).
            double[] expected = [2 - Math.Sqrt(2), 2, 2 + Math.Sqrt(2)];
            if (!Near(native.TridiagonalEigenvalues([2, 2, 2], [-1, -1]), expected))
            {
                return "dsterf_ gave wrong eigenvalues of a 3 x 3 tridiagonal matrix";
            }

            return Near(native.BandEigenvalues(new SymmetricBand(3, 1, [2, -1, 2, -1, 2, 0])), expected)
                ? null
                : "dsbev_ gave wrong eigenvalues of a 3 x 3 band matrix";
        }
        catch (Exception error) when (error is ArithmeticException or InvalidOperationException or ArgumentException)
        {
            return error.Message;
        }
    }

    private static string? Check(ILinearAlgebra provider)
    {
        // [1 2; 3 4] [5 6; 7 8] = [19 22; 43 50], by hand.
        var a = DenseMatrix.OfArray(new double[,] { { 1, 2 }, { 3, 4 } });
        var product = provider.Multiply(a, DenseMatrix.OfArray(new double[,] { { 5, 6 }, { 7, 8 } }));
        if (!Near(product.ToColumnMajorArray(), [19, 43, 22, 50]))
        {
            return "dgemm_ gave a wrong 2 x 2 product";
        }

        // [1 2; 3 4]^T (1, 1) = (4, 6), by hand.
        if (!Near(provider.Multiply(a, [1.0, 1.0], transposeA: true), [4, 6]))
        {
            return "dgemv_ gave a wrong transposed product";
        }

        // The [-1 2 -1] tridiagonal matrix of order 3 has eigenvalues 2 - 2 cos(k pi / 4) = 2 - sqrt 2, 2, 2 + sqrt 2
        // (closed form of the second-difference matrix, common practice).
        var tridiagonal = DenseMatrix.OfArray(new double[,] { { 2, -1, 0 }, { -1, 2, -1 }, { 0, -1, 2 } });
        if (!Near(provider.SymmetricEigen(tridiagonal).Values, [2 - Math.Sqrt(2), 2, 2 + Math.Sqrt(2)]))
        {
            return "the symmetric eigensolver (dsyevd_ or dsyevr_) gave wrong eigenvalues of a 3 x 3 tridiagonal matrix";
        }

        // A quarter-turn rotation [0 -1; 1 0] has eigenvalues -i, +i.
        var rotation = provider.GeneralEigen(DenseMatrix.OfArray(new double[,] { { 0, -1 }, { 1, 0 } })).Values;
        if (rotation.Length != 2 || !Near(rotation.Select(z => z.Imaginary).ToArray(), [-1, 1]) || rotation.Any(z => Math.Abs(z.Real) > _tolerance))
        {
            return "dgeev_ gave wrong eigenvalues of a 2 x 2 rotation";
        }

        // [1 2; 3 4] x = (5, 6) has x = (-4, 4.5), by hand.
        var solution = provider.Solve(a, DenseMatrix.OfColumnMajor(2, 1, [5.0, 6.0]));
        return Near(solution.ToColumnMajorArray(), [-4, 4.5]) ? null : "dgesv_ gave a wrong 2 x 2 solution";
    }

    private static bool Near(double[] actual, double[] expected) =>
        actual.Length == expected.Length && actual.Zip(expected).All(pair => Math.Abs(pair.First - pair.Second) <= _tolerance * Math.Max(1, Math.Abs(pair.Second)));
}
