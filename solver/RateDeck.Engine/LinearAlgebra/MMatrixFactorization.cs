using System.Numerics;
using System.Runtime.InteropServices;

namespace RateDeck.LinearAlgebra;

/// <summary>
/// LU factors of a column diagonally dominant M-matrix A, given not by its entries but by the
/// magnitudes of its off-diagonal entries, m_ij = -A_ij &gt;= 0, and its column excesses
/// e_j = A_jj - sum_(i != j) m_ij &gt;= 0 (for I - a K: e_j = 1 + a loss_j; for -K on a leaking
/// block: the loss plus the outflow leaving the block). Gaussian elimination then never subtracts:
/// the multipliers m_ik / d_k and the Schur complement's off-diagonals m_ij + l_ik m_kj are sums
/// of non-negative numbers, each pivot is recomputed as d_k = e_k + sum_(i &gt; k) m_ik from the
/// current off-diagonals, and the excesses update as e_j + m_kj e_k / d_k. This is the idea of
/// Grassmann, Taksar and Heyman (Oper. Res. 33 (1985) 1107) carried to a non-singular M-matrix,
/// the triplet representation of Alfa, Xue and Ye (Math. Comp. 71 (2002) 217, from memory): every
/// factor is accurate to a few units of roundoff relative to itself, however far the rates spread,
/// and a solve with a non-negative right-hand side is subtraction-free too, so each component of
/// the solution is relatively accurate. No pivoting is needed: column dominance is inherited by
/// every Schur complement, and the multipliers are at most 1. L is stored as the magnitudes m_ik
/// with the pivots beside them, and applied as m_ik (x_k / d_k), never as the quotient m_ik / d_k,
/// which leaves the normal range of doubles when rates span 300 decades.
/// <para>
/// Pivots and Schur complements are sums of entries, so entries near the top of the double range
/// overflow (found by the fuzz test: a rate of 1e308 in a pumped cascade gave infinite steady-state
/// populations and stalled the implicit integrator). A matrix whose largest entry exceeds
/// 2^<see cref="HeadroomExponent"/> is therefore factored as 2^-e A, exactly, with its largest entry
/// brought to about that size, and a solve scales the right side alike.
/// </para>
/// </summary>
public sealed class MMatrixFactorization
{
    private readonly int _n;
    private readonly int _bandwidth;
    private readonly int _stride;
    private readonly int _origin;
    private readonly double[] _factors;
    private readonly double[] _pivots;

    /// <summary>The power of two A was multiplied by before elimination (1 for most matrices).</summary>
    private readonly double _scale;

    /// <summary>Entries are kept below 2^600 (about 4e180): far from overflow in sums of products, far from underflow in a scaled right side.</summary>
    public const int HeadroomExponent = 600;

    /// <summary>
    /// Entry (i, j) lives at [j stride + i + origin]: dense column-major N x N is stride N, origin 0
    /// (bandwidth N - 1); a band of half-width b keeps column j's rows j - b .. j + b contiguous at
    /// [j (2b + 1)], i.e. stride 2b, origin b. Without pivoting the factors keep the band.
    /// </summary>
    private MMatrixFactorization(int n, int bandwidth, int stride, int origin, double[] factors, double[] pivots, double scale)
    {
        _scale = scale;
        _n = n;
        _bandwidth = bandwidth;
        _stride = stride;
        _origin = origin;
        _factors = factors;
        _pivots = pivots;
    }

    /// <summary>The order N.</summary>
    public int Count => _n;

    /// <summary>
    /// Factors A from <paramref name="offDiagonal"/> (column-major N x N, m_ij at [j N + i]; the
    /// diagonal slots are ignored; consumed: it receives the factors) and <paramref name="excess"/>
    /// (length N; consumed).
    /// </summary>
    /// <exception cref="SingularMatrixException">A pivot is zero: a set of states has no way out and no excess.</exception>
    public static MMatrixFactorization Factor(int n, double[] offDiagonal, double[] excess)
    {
        ArgumentNullException.ThrowIfNull(offDiagonal);
        ArgumentNullException.ThrowIfNull(excess);
        if (offDiagonal.Length != n * n || excess.Length != n)
        {
            throw new ArgumentException($"expected {n} x {n} off-diagonal magnitudes and {n} excesses", nameof(offDiagonal));
        }

        return Eliminate(n, Math.Max(0, n - 1), n, 0, offDiagonal, excess);
    }

    /// <summary>
    /// As <see cref="Factor"/> for a banded A (m_ij = 0 when |i - j| &gt; <paramref name="bandwidth"/>),
    /// in O(N b^2) operations and N (2b + 1) numbers: <paramref name="band"/> holds column j's rows
    /// j - b .. j + b at [j (2b + 1) + (i - j + b)] (slots outside the matrix ignored; consumed).
    /// </summary>
    /// <exception cref="SingularMatrixException">A pivot is zero: a set of states has no way out and no excess.</exception>
    public static MMatrixFactorization FactorBand(int n, int bandwidth, double[] band, double[] excess)
    {
        ArgumentNullException.ThrowIfNull(band);
        ArgumentNullException.ThrowIfNull(excess);
        if (bandwidth < 0 || band.Length != n * ((2 * bandwidth) + 1) || excess.Length != n)
        {
            throw new ArgumentException($"expected {n} band columns of {(2 * bandwidth) + 1} off-diagonal magnitudes and {n} excesses", nameof(band));
        }

        return Eliminate(n, bandwidth, 2 * bandwidth, bandwidth, band, excess);
    }

    private static MMatrixFactorization Eliminate(int n, int bandwidth, int stride, int origin, double[] m, double[] excess)
    {
        var scale = BringBelowHeadroom(m, excess);
        var pivots = new double[n];
        for (var k = 0; k < n; k++)
        {
            var last = Math.Min(n - 1, k + bandwidth);
            var start = (k * stride) + origin;
            var below = m.AsSpan(start + k + 1, last - k);
            var pivot = excess[k];
            foreach (var value in below)
            {
                pivot += value;
            }

            if (!(pivot > 0))
            {
                throw new SingularMatrixException($"pivot {k + 1} of {n} is {pivot}: the states left at that point have no way out");
            }

            pivots[k] = pivot;
            for (var j = k + 1; j <= last; j++)
            {
                var column = (j * stride) + origin;
                var mkj = m[column + k];
                if (mkj != 0)
                {
                    // l_ik m_kj formed as m_ik (m_kj / d_k): the multiplier m_ik / d_k alone can fall
                    // below the normal range when rates span 300 decades (then it keeps few bits), while
                    // m_kj / d_k is small only where its product is negligible beside m_ij.
                    var ratio = mkj / pivot;
                    excess[j] += excess[k] * ratio;
                    AddScaled(m.AsSpan(column + k + 1, last - k), below, ratio);
                }
            }
        }

        return new MMatrixFactorization(n, bandwidth, stride, origin, m, pivots, scale);
    }

    /// <summary>Multiplies the entries by the power of two that brings the largest below 2^<see cref="HeadroomExponent"/>; returns it (1 when none is needed).</summary>
    private static double BringBelowHeadroom(double[] m, double[] excess)
    {
        var largest = 0.0;
        foreach (var value in m)
        {
            largest = Math.Max(largest, value);
        }

        foreach (var value in excess)
        {
            largest = Math.Max(largest, value);
        }

        var exponent = double.IsFinite(largest) ? Math.ILogB(largest) : 0;
        if (exponent < HeadroomExponent)
        {
            return 1;
        }

        var scale = Math.ScaleB(1, HeadroomExponent - 1 - exponent);
        Scale(m, scale);
        Scale(excess, scale);
        return scale;
    }

    private static void Scale(Span<double> values, double scale)
    {
        for (var i = 0; i < values.Length; i++)
        {
            values[i] *= scale;
        }
    }

    /// <summary>Overwrites <paramref name="b"/> with A^-1 b.</summary>
    public void Solve(Span<double> b)
    {
        if (b.Length != _n)
        {
            throw new ArgumentException($"the right-hand side has {b.Length} entries, not {_n}", nameof(b));
        }

        if (_scale != 1)
        {
            Scale(b, _scale);
        }

        var n = _n;
        for (var k = 0; k < n - 1; k++)
        {
            if (b[k] != 0)
            {
                // L's column k is kept as m_ik, not m_ik / d_k (see the elimination).
                var last = Math.Min(n - 1, k + _bandwidth);
                AddScaled(b[(k + 1)..(last + 1)], _factors.AsSpan((k * _stride) + _origin + k + 1, last - k), b[k] / _pivots[k]);
            }
        }

        for (var k = n - 1; k >= 0; k--)
        {
            b[k] /= _pivots[k];
            if (b[k] != 0 && k > 0)
            {
                var first = Math.Max(0, k - _bandwidth);
                AddScaled(b[first..k], _factors.AsSpan((k * _stride) + _origin + first, k - first), b[k]);
            }
        }
    }

    /// <summary>y += a x, in SIMD lanes where the hardware has them.</summary>
    private static void AddScaled(Span<double> y, ReadOnlySpan<double> x, double a)
    {
        var i = 0;
        if (Vector.IsHardwareAccelerated && y.Length >= Vector<double>.Count)
        {
            var yv = MemoryMarshal.Cast<double, Vector<double>>(y);
            var xv = MemoryMarshal.Cast<double, Vector<double>>(x);
            var av = new Vector<double>(a);
            for (var v = 0; v < yv.Length; v++)
            {
                yv[v] += xv[v] * av;
            }

            i = yv.Length * Vector<double>.Count;
        }

        for (; i < y.Length; i++)
        {
            y[i] += x[i] * a;
        }
    }
}
