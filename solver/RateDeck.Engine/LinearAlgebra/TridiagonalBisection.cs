namespace RateDeck.LinearAlgebra;

/// <summary>
/// Chosen eigenvalues of a symmetric tridiagonal matrix T (diagonal d, off-diagonal e) by
/// bisection on Sturm counts, without the others: O(N) operations per count, about 55 counts per
/// eigenvalue, O(N) memory. The count of eigenvalues below x is the number of negative pivots of
/// the LDL^T factorization of T - x I (Sylvester's law of inertia); computed in floating point it
/// is the exact count of a matrix within a few eps of T entry by entry (Kahan, 1966; Demmel,
/// Applied Numerical Linear Algebra, SIAM 1997, sec. 5.3.4; both from memory), so each eigenvalue
/// is found to an absolute accuracy of a few eps ||T||, whatever N, and the counts stay
/// monotone in x. Pivots smaller than <c>pivmin</c> are replaced by -pivmin, as LAPACK's dstebz
/// does, so that no division by zero occurs.
/// </summary>
public static class TridiagonalBisection
{
    /// <summary>
    /// Absolute accuracy of an eigenvalue found here, in units of eps ||T||_inf: the backward
    /// error of a count (the diagonal moves by at most eps (|d_i| + |x|), an off-diagonal by
    /// 2.5 eps |e_i|, so at most about 7 eps ||T||_inf in the 2-norm, Weyl's theorem), the
    /// bisection interval's last width (2 eps |lambda|) and the rounding of T's own entries when
    /// they were formed from rates (a few eps each): 16 leaves a margin over their sum.
    /// </summary>
    public const double AccuracyFactor = 16;

    /// <summary>Eigenvalues counted at once in one sweep over T: independent recurrences keep the divider busy.</summary>
    private const int _batch = 8;

    /// <summary>||T||_inf = max_i |e_(i-1)| + |d_i| + |e_i|.</summary>
    public static double NormInf(double[] diagonal, double[] offDiagonal)
    {
        ArgumentNullException.ThrowIfNull(diagonal);
        ArgumentNullException.ThrowIfNull(offDiagonal);
        var norm = 0.0;
        for (var i = 0; i < diagonal.Length; i++)
        {
            var row = Math.Abs(diagonal[i]) + (i > 0 ? Math.Abs(offDiagonal[i - 1]) : 0) + (i < diagonal.Length - 1 ? Math.Abs(offDiagonal[i]) : 0);
            norm = Math.Max(norm, row);
        }

        return norm;
    }

    /// <summary>The number of eigenvalues of T below each of <paramref name="shifts"/>.</summary>
    public static int[] CountBelow(double[] diagonal, double[] offDiagonal, IReadOnlyList<double> shifts)
    {
        ArgumentNullException.ThrowIfNull(shifts);
        var squares = Squares(diagonal, offDiagonal);
        var counts = new int[shifts.Count];
        var pivmin = PivotFloor(squares);
        for (var start = 0; start < shifts.Count; start += _batch)
        {
            var size = Math.Min(_batch, shifts.Count - start);
            Count(diagonal, squares, pivmin, [.. shifts.Skip(start).Take(size)], counts.AsSpan(start, size));
        }

        return counts;
    }

    /// <summary>
    /// The eigenvalues of T with the given zero-based positions in ascending order
    /// (<paramref name="indices"/>), in the order asked; each to within an interval of width
    /// 2 eps max(|lambda|, eps ||T||_inf) or to adjacent doubles.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">An index outside 0 .. N - 1.</exception>
    public static double[] Eigenvalues(double[] diagonal, double[] offDiagonal, IReadOnlyList<int> indices)
    {
        ArgumentNullException.ThrowIfNull(indices);
        var n = diagonal.Length;
        if (indices.Any(k => k < 0 || k >= n))
        {
            throw new ArgumentOutOfRangeException(nameof(indices), $"eigenvalue positions run from 0 to {n - 1}");
        }

        var squares = Squares(diagonal, offDiagonal);
        var pivmin = PivotFloor(squares);
        var norm = NormInf(diagonal, offDiagonal);
        // Gershgorin's interval holds every eigenvalue; widened so that its ends count strictly.
        var (low, high) = Gershgorin(diagonal, offDiagonal);
        var pad = (2 * Precision.MachineEpsilon * norm) + pivmin;
        var floor = Precision.MachineEpsilon * norm;
        var lower = Enumerable.Repeat(low - pad, indices.Count).ToArray();
        var upper = Enumerable.Repeat(high + pad, indices.Count).ToArray();
        var open = Enumerable.Range(0, indices.Count).ToList();
        while (open.Count > 0)
        {
            var middles = open.Select(a => 0.5 * (lower[a] + upper[a])).ToArray();
            var counts = new int[open.Count];
            for (var start = 0; start < open.Count; start += _batch)
            {
                var size = Math.Min(_batch, open.Count - start);
                Count(diagonal, squares, pivmin, middles.AsSpan(start, size), counts.AsSpan(start, size));
            }

            var still = new List<int>();
            for (var c = 0; c < open.Count; c++)
            {
                var a = open[c];
                var middle = middles[c];
                if (middle <= lower[a] || middle >= upper[a])
                {
                    continue;
                }

                // More than k eigenvalues below the middle: the k-th (zero-based) lies below it.
                if (counts[c] > indices[a])
                {
                    upper[a] = middle;
                }
                else
                {
                    lower[a] = middle;
                }

                if (upper[a] - lower[a] > 2 * Precision.MachineEpsilon * Math.Max(Math.Max(Math.Abs(lower[a]), Math.Abs(upper[a])), floor))
                {
                    still.Add(a);
                }
            }

            open = still;
        }

        return [.. Enumerable.Range(0, indices.Count).Select(a => 0.5 * (lower[a] + upper[a]))];
    }

    private static (double Low, double High) Gershgorin(double[] diagonal, double[] offDiagonal)
    {
        var (low, high) = (double.PositiveInfinity, double.NegativeInfinity);
        for (var i = 0; i < diagonal.Length; i++)
        {
            var radius = (i > 0 ? Math.Abs(offDiagonal[i - 1]) : 0) + (i < diagonal.Length - 1 ? Math.Abs(offDiagonal[i]) : 0);
            low = Math.Min(low, diagonal[i] - radius);
            high = Math.Max(high, diagonal[i] + radius);
        }

        return (low, high);
    }

    private static double[] Squares(double[] diagonal, double[] offDiagonal)
    {
        ArgumentNullException.ThrowIfNull(diagonal);
        ArgumentNullException.ThrowIfNull(offDiagonal);
        if (offDiagonal.Length != Math.Max(diagonal.Length - 1, 0))
        {
            throw new ArgumentException($"a tridiagonal matrix of order {diagonal.Length} has {Math.Max(diagonal.Length - 1, 0)} off-diagonal entries, not {offDiagonal.Length}", nameof(offDiagonal));
        }

        return [.. offDiagonal.Select(v => v * v)];
    }

    /// <summary>The smallest positive normal double, 2^-1022.</summary>
    private const double _smallestNormal = 2.2250738585072014e-308;

    /// <summary>The smallest pivot magnitude allowed: the smallest normal double times the largest e_i^2 (at least 1), as in LAPACK's dstebz.</summary>
    private static double PivotFloor(double[] squares) => _smallestNormal * Math.Max(1.0, squares.DefaultIfEmpty(0).Max());

    /// <summary>Sturm counts for up to <see cref="_batch"/> shifts in one sweep: the pivots q_i = d_i - x - e_(i-1)^2 / q_(i-1), negatives counted.</summary>
    private static void Count(double[] diagonal, double[] squares, double pivmin, ReadOnlySpan<double> shifts, Span<int> counts)
    {
        var m = shifts.Length;
        Span<double> pivots = stackalloc double[_batch];
        Span<int> negatives = stackalloc int[_batch];
        negatives.Clear();
        for (var s = 0; s < m; s++)
        {
            var q = diagonal[0] - shifts[s];
            pivots[s] = Math.Abs(q) < pivmin ? -pivmin : q;
            negatives[s] += pivots[s] < 0 ? 1 : 0;
        }

        for (var i = 1; i < diagonal.Length; i++)
        {
            var d = diagonal[i];
            var square = squares[i - 1];
            for (var s = 0; s < m; s++)
            {
                var q = d - shifts[s] - (square / pivots[s]);
                q = Math.Abs(q) < pivmin ? -pivmin : q;
                pivots[s] = q;
                negatives[s] += q < 0 ? 1 : 0;
            }
        }

        for (var s = 0; s < m; s++)
        {
            counts[s] = negatives[s];
        }
    }
}
