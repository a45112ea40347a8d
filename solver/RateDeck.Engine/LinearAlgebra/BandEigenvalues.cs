
namespace RateDeck.LinearAlgebra;

/// <summary>
/// The managed provider's eigenvalues of a symmetric band matrix (the symmetrized generator of a
/// sparse deck) without eigenvectors: the implicit QL iteration below for a tridiagonal matrix,
/// O(N) memory; a wider band is expanded to dense (N^2 memory, refused above
/// <see cref="DenseStorage.StateLimit"/> states). The native provider uses dsterf_ and dsbev_.
/// </summary>
public static class BandEigenvalues
{
    /// <summary>A QL sweep count per eigenvalue beyond which the managed iteration gives up (it needs about 2).</summary>
    private const int _maxSweepsPerValue = 60;

    /// <summary>Eigenvalues of <paramref name="band"/>, ascending, with <paramref name="algebra"/>'s dense solver for a wide band; <paramref name="method"/> names the routine used.</summary>
    /// <exception cref="DenseStorageException">Band wider than 1 and more than <see cref="DenseStorage.StateLimit"/> states.</exception>
    internal static double[] Managed(SymmetricBand band, ILinearAlgebra algebra, out string method)
    {
        ArgumentNullException.ThrowIfNull(band);
        ArgumentNullException.ThrowIfNull(algebra);
        var why = $"bandwidth {band.Bandwidth}: no managed band reduction";
        if (band.Bandwidth <= 1)
        {
            try
            {
                method = "managed implicit QL (tridiagonal)";
                return Tridiagonal(band.Diagonal(), band.SubDiagonal());
            }
            catch (ArithmeticException e) when (band.Count <= DenseStorage.StateLimit)
            {
                // A strongly graded stiff chain can defeat the QL sweeps in one direction; the dense solver takes it.
                why = e.Message;
            }
        }

        if (band.Count > DenseStorage.StateLimit)
        {
            throw new DenseStorageException(
                $"the eigenvalues of a {band.Count}-state band matrix of bandwidth {band.Bandwidth} need the native library (dsbev_) or a dense {band.Count} x {band.Count} array, beyond the {DenseStorage.StateLimit}-state limit; install OpenBLAS (Debian package libopenblas0)");
        }

        method = $"managed dense symmetric eigen-solver ({why})";
        var dense = MathNet.Numerics.LinearAlgebra.Double.DenseMatrix.Create(band.Count, band.Count, (i, j) => band[i, j]);
        return algebra.SymmetricEigen(dense).Values;
    }

    /// <summary>
    /// Eigenvalues, ascending, of the symmetric tridiagonal matrix (diagonal d, off-diagonal e) by
    /// the implicit QL iteration with Wilkinson's shift and plane rotations, no vectors: O(N^2)
    /// time, O(N) memory, backward stable (Golub and Van Loan, Matrix Computations, 4th ed.,
    /// sec. 8.3; Bowdler, Martin, Reinsch and Wilkinson, Numer. Math. 11 (1968) 293; both from
    /// memory). An off-diagonal entry counts as zero when |e_m| &lt;= eps (|d_m| + |d_(m+1)|).
    /// </summary>
    /// <exception cref="ArithmeticException">The iteration did not converge (it always does in practice).</exception>
    public static double[] Tridiagonal(double[] diagonal, double[] offDiagonal)
    {
        ArgumentNullException.ThrowIfNull(diagonal);
        ArgumentNullException.ThrowIfNull(offDiagonal);
        var n = diagonal.Length;
        var d = (double[])diagonal.Clone();
        var e = new double[Math.Max(n, 1)];
        Array.Copy(offDiagonal, e, Math.Min(offDiagonal.Length, Math.Max(n - 1, 0)));
        for (var l = 0; l < n; l++)
        {
            for (var sweep = 0; ; sweep++)
            {
                var m = l;
                while (m < n - 1 && Math.Abs(e[m]) > double.Epsilon + (Precision.MachineEpsilon * (Math.Abs(d[m]) + Math.Abs(d[m + 1]))))
                {
                    m++;
                }

                if (m == l)
                {
                    break;
                }

                if (sweep == _maxSweepsPerValue)
                {
                    throw new ArithmeticException($"the tridiagonal QL iteration did not converge for eigenvalue {l + 1} of {n}");
                }

                Sweep(d, e, l, m);
            }
        }

        Array.Sort(d);
        return d;
    }

    /// <summary>One implicit QL step with Wilkinson's shift on the unreduced block l..m.</summary>
    private static void Sweep(double[] d, double[] e, int l, int m)
    {
        // Shift: the eigenvalue of the leading 2 x 2 block nearer d_l.
        var g = (d[l + 1] - d[l]) / (2.0 * e[l]);
        var r = Hypot(g, 1.0);
        g = d[m] - d[l] + (e[l] / (g + Math.CopySign(r, g)));
        double s = 1.0, c = 1.0, p = 0.0;
        for (var i = m - 1; i >= l; i--)
        {
            var f = s * e[i];
            var b = c * e[i];
            r = Hypot(f, g);
            e[i + 1] = r;
            if (r == 0.0)
            {
                // The block split at i + 1: undo the partial shift and deflate.
                d[i + 1] -= p;
                e[m] = 0.0;
                return;
            }

            s = f / r;
            c = g / r;
            g = d[i + 1] - p;
            r = ((d[i] - g) * s) + (2.0 * c * b);
            p = s * r;
            d[i + 1] = g + p;
            g = (c * r) - b;
        }

        d[l] -= p;
        e[l] = g;
        e[m] = 0.0;
    }

    private static double Hypot(double a, double b)
    {
        a = Math.Abs(a);
        b = Math.Abs(b);
        if (a < b)
        {
            (a, b) = (b, a);
        }

        if (a == 0)
        {
            return 0;
        }

        var ratio = b / a;
        return a * Math.Sqrt(1 + (ratio * ratio));
    }
}
