using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;

namespace RateDeck.Propagation;

/// <summary>
/// exp(A) of a dense real matrix by scaling and squaring with Pade approximants: N. J. Higham,
/// "The scaling and squaring method for the matrix exponential revisited", SIAM J. Matrix Anal.
/// Appl. 26 (2005) 1179, Algorithm 2.3, with theta_m from its Table 2.3. The lowest order m in
/// {3, 5, 7, 9} with ||A||_1 &lt;= theta_m is used unscaled; otherwise A is divided by 2^s so that
/// ||A / 2^s||_1 &lt;= theta_13, the [13/13] approximant is formed and squared s times. Cost
/// O(N^3): about 6 + s matrix products and one LU solve, all through the
/// <see cref="ILinearAlgebra"/> provider (so a native BLAS speeds them up).
/// </summary>
public static class MatrixExponential
{
    /// <summary>theta_3 .. theta_9 of Higham (2005) Table 2.3; the same constants appear in SciPy 1.10.1's scipy/sparse/linalg/_matfuncs.py.</summary>
    private static readonly (int Order, double Theta)[] _lowOrders =
    [
        (3, 1.495585217958292e-2),
        (5, 2.539398330063230e-1),
        (7, 9.504178996162932e-1),
        (9, 2.097847961257068e0),
    ];

    /// <summary>theta_13 of Higham (2005) Table 2.3 (quoted from the paper, from memory; SciPy's newer algorithm uses 4.25 instead).</summary>
    private const double _theta13 = 5.371920351148152;

    /// <summary>exp(<paramref name="a"/>) with products and solves by <paramref name="la"/>; the input is not modified.</summary>
    /// <exception cref="ArgumentException">The matrix is not square or has a non-finite entry.</exception>
    public static DenseMatrix Pade(DenseMatrix a, ILinearAlgebra la)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(la);
        if (a.RowCount != a.ColumnCount)
        {
            throw new ArgumentException("the matrix exponential needs a square matrix", nameof(a));
        }

        var norm = a.L1Norm();
        if (!double.IsFinite(norm))
        {
            throw new ArgumentException("the matrix has a non-finite entry", nameof(a));
        }

        foreach (var (order, theta) in _lowOrders)
        {
            if (norm <= theta)
            {
                return Rational(a, order, la);
            }
        }

        var squarings = Math.Max(0, (int)Math.Ceiling(Math.Log2(norm / _theta13)));
        var x = Rational((DenseMatrix)(a * Math.ScaleB(1.0, -squarings)), 13, la);
        for (var k = 0; k < squarings; k++)
        {
            x = la.Multiply(x, x);
        }

        return x;
    }

    /// <summary>
    /// r_m(A) = q_m(A)^(-1) p_m(A), p_m = U + V split into odd (U) and even (V) parts, q_m = V - U;
    /// for m = 13 the evaluation of Higham (2005) section 2 (six products instead of twelve).
    /// </summary>
    private static DenseMatrix Rational(DenseMatrix a, int m, ILinearAlgebra la)
    {
        var b = Coefficients(m);
        Matrix<double> identity = DenseMatrix.CreateIdentity(a.RowCount);
        DenseMatrix Times(Matrix<double> left, Matrix<double> right) => la.Multiply((DenseMatrix)left, (DenseMatrix)right);
        var a2 = Times(a, a);
        Matrix<double> u, v;
        if (m == 13)
        {
            var a4 = Times(a2, a2);
            var a6 = Times(a2, a4);
            u = Times(a, Times(a6, (b[13] * a6) + (b[11] * a4) + (b[9] * a2)) + (b[7] * a6) + (b[5] * a4) + (b[3] * a2) + (b[1] * identity));
            v = Times(a6, (b[12] * a6) + (b[10] * a4) + (b[8] * a2)) + (b[6] * a6) + (b[4] * a4) + (b[2] * a2) + (b[0] * identity);
        }
        else
        {
            var power = identity;
            var odd = b[1] * identity;
            v = b[0] * identity;
            for (var k = 1; 2 * k <= m; k++)
            {
                power = Times(power, a2);
                odd += b[(2 * k) + 1] * power;
                v += b[2 * k] * power;
            }

            u = Times(a, odd);
        }

        return la.Solve((DenseMatrix)(v - u), (DenseMatrix)(u + v));
    }

    /// <summary>
    /// Coefficients of the [m/m] Pade numerator of e^x, p_m(x) = sum_j c_j x^j with
    /// c_j = (2m - j)! m! / ((2m)! j! (m - j)!) (Higham 2005 eq. 2.2), by the ratio
    /// c_(j+1) / c_j = (m - j) / ((2m - j)(j + 1)) so that no factorial is formed.
    /// </summary>
    private static double[] Coefficients(int m)
    {
        var c = new double[m + 1];
        c[0] = 1.0;
        for (var j = 0; j < m; j++)
        {
            c[j + 1] = c[j] * (m - j) / ((2.0 * m - j) * (j + 1));
        }

        return c;
    }
}
