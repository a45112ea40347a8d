namespace RateDeck.LinearAlgebra;

/// <summary>
/// Eigenvalues and orthonormal eigenvectors of a real symmetric matrix held in double-double.
/// </summary>
/// <param name="Count">The order N.</param>
/// <param name="Values">Eigenvalues, ascending.</param>
/// <param name="Vectors">Eigenvectors, column-major N x N: column m at [m N .. m N + N), in the order of <paramref name="Values"/>.</param>
/// <param name="Sweeps">Jacobi sweeps taken.</param>
public sealed record ExtendedSymmetricEigenDecomposition(int Count, DoubleDouble[] Values, DoubleDouble[] Vectors, int Sweeps);

/// <summary>
/// The cyclic Jacobi method (Golub and Van Loan, Matrix Computations, 4th ed., sec. 8.5, from
/// memory) in double-double arithmetic. Each rotation is backward stable, so every eigenvalue
/// carries an absolute error of a modest multiple of N 2^-104 ||A||_2, against N 2^-53 ||A||_2 in
/// double: a mode 10^15 times slower than the fastest keeps about 16 digits instead of none.
/// A pair is skipped once |a_pq| &lt;= 2^-104 sqrt(|a_pp a_qq|) (the relative test of Demmel and
/// Veselić, SIAM J. Matrix Anal. Appl. 13 (1992) 1204), and the sweeps stop when one rotates
/// nothing. Cost: about 60 N^3 double operations per sweep and 6 to 12 sweeps, so it serves
/// moderate N only (<see cref="Decompose"/> is given the N the caller allows).
/// </summary>
public static class ExtendedSymmetricEigen
{
    /// <summary>Sweeps after which the method gives up (convergence is quadratic; 12 is typical at N = 100).</summary>
    public const int MaxSweeps = 60;

    /// <summary>Decomposes the symmetric matrix <paramref name="matrix"/> (column-major N x N; consumed).</summary>
    /// <exception cref="ArithmeticException">No convergence within <see cref="MaxSweeps"/> sweeps.</exception>
    public static ExtendedSymmetricEigenDecomposition Decompose(int n, DoubleDouble[] matrix)
    {
        ArgumentNullException.ThrowIfNull(matrix);
        if (matrix.Length != n * n)
        {
            throw new ArgumentException($"the matrix has {matrix.Length} entries, not {n} x {n}", nameof(matrix));
        }

        // Scaled into the safe range first: a double-double product splits its factors, which overflows above about 1e300.
        var scale = EigenScaling.Factor(matrix.Select(x => x.Hi));
        var a = scale == 1 ? matrix : [.. matrix.Select(x => new DoubleDouble(x.Hi * scale, x.Lo * scale))];
        var v = new DoubleDouble[n * n];
        for (var i = 0; i < n; i++)
        {
            v[(i * n) + i] = DoubleDouble.One;
        }

        var sweeps = 0;
        for (var rotated = true; rotated; sweeps++)
        {
            if (sweeps == MaxSweeps)
            {
                throw new ArithmeticException($"the extended-precision Jacobi method did not converge in {MaxSweeps} sweeps");
            }

            rotated = false;
            for (var p = 0; p < n - 1; p++)
            {
                for (var q = p + 1; q < n; q++)
                {
                    rotated |= Rotate(a, v, n, p, q);
                }
            }
        }

        var order = Enumerable.Range(0, n).OrderBy(i => a[(i * n) + i].Hi).ThenBy(i => a[(i * n) + i].Lo).ToArray();
        var values = order.Select(i => new DoubleDouble(a[(i * n) + i].Hi / scale, a[(i * n) + i].Lo / scale)).ToArray();
        var vectors = new DoubleDouble[n * n];
        for (var m = 0; m < n; m++)
        {
            Array.Copy(v, order[m] * n, vectors, m * n, n);
        }

        return new ExtendedSymmetricEigenDecomposition(n, values, vectors, sweeps);
    }

    /// <summary>One Jacobi rotation annihilating a_pq (Rutishauser's form: the diagonal moves by t a_pq); false when a_pq is negligible.</summary>
    private static bool Rotate(DoubleDouble[] a, DoubleDouble[] v, int n, int p, int q)
    {
        var apq = a[(q * n) + p];
        var app = a[(p * n) + p];
        var aqq = a[(q * n) + q];
        if (apq.Hi == 0 || Math.Abs(apq.Hi) <= DoubleDouble.Epsilon * Math.Sqrt(Math.Abs(app.Hi * aqq.Hi)))
        {
            a[(q * n) + p] = DoubleDouble.Zero;
            a[(p * n) + q] = DoubleDouble.Zero;
            return false;
        }

        // theta = (a_qq - a_pp) / (2 a_pq); t = sign(theta) / (|theta| + sqrt(theta^2 + 1)), or 1 / (2 theta) when theta^2 would overflow.
        var theta = (aqq - app) / (apq * 2.0);
        var absTheta = DoubleDouble.Abs(theta);
        var t = absTheta.Hi > 1e150
            ? DoubleDouble.One / (theta * 2.0)
            : DoubleDouble.One / (absTheta + DoubleDouble.Sqrt((theta * theta) + DoubleDouble.One));
        if (theta.Hi < 0 && absTheta.Hi <= 1e150)
        {
            t = -t;
        }

        var c = DoubleDouble.One / DoubleDouble.Sqrt((t * t) + DoubleDouble.One);
        var s = t * c;
        a[(p * n) + p] = app - (t * apq);
        a[(q * n) + q] = aqq + (t * apq);
        a[(q * n) + p] = DoubleDouble.Zero;
        a[(p * n) + q] = DoubleDouble.Zero;
        for (var r = 0; r < n; r++)
        {
            if (r != p && r != q)
            {
                var arp = a[(p * n) + r];
                var arq = a[(q * n) + r];
                var newP = (c * arp) - (s * arq);
                var newQ = (s * arp) + (c * arq);
                a[(p * n) + r] = newP;
                a[(r * n) + p] = newP;
                a[(q * n) + r] = newQ;
                a[(r * n) + q] = newQ;
            }

            var vrp = v[(p * n) + r];
            var vrq = v[(q * n) + r];
            v[(p * n) + r] = (c * vrp) - (s * vrq);
            v[(q * n) + r] = (s * vrp) + (c * vrq);
        }

        return true;
    }
}
