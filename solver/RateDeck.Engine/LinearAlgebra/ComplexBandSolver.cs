using System.Numerics;

namespace RateDeck.LinearAlgebra;

/// <summary>
/// Solves (z I - t S) X = B for a real symmetric band matrix S (bandwidth b), a complex shift z
/// and real right-hand sides, by Gaussian elimination with partial pivoting in band storage
/// (the scheme of LAPACK's zgbsv: pivoting widens the upper band to 2b). Row i keeps columns
/// i - b .. i + 2b, which holds every entry elimination can create. O(N b^2) time per solve,
/// O(N b) memory, allocated once; backward stable like any partially pivoted elimination.
/// A tridiagonal S (b = 1) takes the same elimination on three diagonals and one fill-in diagonal
/// (the scheme of LAPACK's zgtsv), without the band loops: the same pivots and the same operations
/// on each entry, about three times faster.
/// </summary>
internal sealed class ComplexBandSolver
{
    private readonly SymmetricBand _s;
    private readonly int _n;
    private readonly int _b;
    private readonly int _width;
    private readonly int _rightSides;
    private readonly Complex[] _a;
    private readonly Complex[] _x;

    /// <summary>A solver for <paramref name="s"/> with <paramref name="rightSides"/> right-hand sides per solve.</summary>
    public ComplexBandSolver(SymmetricBand s, int rightSides)
    {
        _s = s;
        _n = s.Count;
        _b = s.Bandwidth;
        _width = (3 * _b) + 1;
        _rightSides = rightSides;
        _a = new Complex[_n * _width];
        _x = new Complex[_n * rightSides];
    }

    /// <summary>
    /// X = (z I - t S)^(-1) B for the right-hand sides <paramref name="b"/> (each of length N);
    /// the solution is returned row by row, X[i, q] at [i * rightSides + q], and is overwritten by the next solve.
    /// </summary>
    /// <exception cref="ArithmeticException">A pivot is exactly zero (z is an eigenvalue of t S).</exception>
    public ReadOnlySpan<Complex> Solve(Complex z, double t, IReadOnlyList<double[]> b)
    {
        if (_b == 1)
        {
            SolveTridiagonal(z, t, b);
            return _x;
        }

        Fill(z, t, b);
        Eliminate();
        Substitute();
        return _x;
    }

    private ref Complex At(int row, int column) => ref _a[(row * _width) + column - row + _b];

    private void Fill(Complex z, double t, IReadOnlyList<double[]> b)
    {
        Array.Clear(_a);
        for (var i = 0; i < _n; i++)
        {
            for (var c = Math.Max(0, i - _b); c <= Math.Min(_n - 1, i + _b); c++)
            {
                At(i, c) = (c == i ? z : Complex.Zero) - (t * _s[i, c]);
            }

            for (var q = 0; q < _rightSides; q++)
            {
                _x[(i * _rightSides) + q] = b[q][i];
            }
        }
    }

    private void Eliminate()
    {
        for (var k = 0; k < _n; k++)
        {
            var lastRow = Math.Min(_n - 1, k + _b);
            var lastColumn = Math.Min(_n - 1, k + (2 * _b));
            var pivotRow = k;
            var largest = Magnitude(At(k, k));
            for (var r = k + 1; r <= lastRow; r++)
            {
                var size = Magnitude(At(r, k));
                if (size > largest)
                {
                    (pivotRow, largest) = (r, size);
                }
            }

            if (largest == 0)
            {
                throw new ArithmeticException("the shifted band matrix is singular: a contour node lies on the spectrum");
            }

            if (pivotRow != k)
            {
                for (var c = k; c <= lastColumn; c++)
                {
                    (At(k, c), At(pivotRow, c)) = (At(pivotRow, c), At(k, c));
                }

                for (var q = 0; q < _rightSides; q++)
                {
                    (_x[(k * _rightSides) + q], _x[(pivotRow * _rightSides) + q]) = (_x[(pivotRow * _rightSides) + q], _x[(k * _rightSides) + q]);
                }
            }

            var pivot = At(k, k);
            for (var r = k + 1; r <= lastRow; r++)
            {
                var factor = At(r, k) / pivot;
                if (factor == Complex.Zero)
                {
                    continue;
                }

                for (var c = k + 1; c <= lastColumn; c++)
                {
                    At(r, c) -= factor * At(k, c);
                }

                for (var q = 0; q < _rightSides; q++)
                {
                    _x[(r * _rightSides) + q] -= factor * _x[(k * _rightSides) + q];
                }
            }
        }
    }

    private void Substitute()
    {
        for (var k = _n - 1; k >= 0; k--)
        {
            var lastColumn = Math.Min(_n - 1, k + (2 * _b));
            var inverse = 1.0 / At(k, k);
            for (var q = 0; q < _rightSides; q++)
            {
                var sum = _x[(k * _rightSides) + q];
                for (var c = k + 1; c <= lastColumn; c++)
                {
                    sum -= At(k, c) * _x[(c * _rightSides) + q];
                }

                _x[(k * _rightSides) + q] = sum * inverse;
            }
        }
    }

    /// <summary>
    /// (z I - t S) X = B for a tridiagonal S. Row k is held as (lower[k], diagonal[k], upper[k],
    /// fill[k]) for columns k - 1 .. k + 2; at step k the pivot is the larger of diagonal[k] and the
    /// entry below it, rows swapped when the lower one is strictly larger, as in the band scheme.
    /// </summary>
    private void SolveTridiagonal(Complex z, double t, IReadOnlyList<double[]> b)
    {
        var n = _n;
        var q = _rightSides;
        // _a holds four diagonals of length N: diagonal, upper, fill (second upper) and lower.
        var diagonal = _a.AsSpan(0, n);
        var upper = _a.AsSpan(n, n);
        var fill = _a.AsSpan(2 * n, n);
        var lower = _a.AsSpan(3 * n, n);
        var s = _s.Lower;
        for (var i = 0; i < n; i++)
        {
            diagonal[i] = z - (t * s[2 * i]);
            var off = i < n - 1 ? new Complex(-t * s[(2 * i) + 1], 0) : Complex.Zero;
            (upper[i], lower[i], fill[i]) = (off, off, Complex.Zero);
            for (var r = 0; r < q; r++)
            {
                _x[(i * q) + r] = b[r][i];
            }
        }

        for (var k = 0; k < n - 1; k++)
        {
            if (Magnitude(lower[k]) > Magnitude(diagonal[k]))
            {
                // Swap rows k and k + 1, then eliminate with the old diagonal entry below.
                var factor = diagonal[k] / lower[k];
                diagonal[k] = lower[k];
                var below = diagonal[k + 1];
                diagonal[k + 1] = upper[k] - (factor * below);
                if (k < n - 2)
                {
                    fill[k] = upper[k + 1];
                    upper[k + 1] = -factor * fill[k];
                }

                upper[k] = below;
                for (var r = 0; r < q; r++)
                {
                    var top = _x[(k * q) + r];
                    _x[(k * q) + r] = _x[((k + 1) * q) + r];
                    _x[((k + 1) * q) + r] = top - (factor * _x[((k + 1) * q) + r]);
                }
            }
            else
            {
                if (diagonal[k] == Complex.Zero)
                {
                    throw new ArithmeticException("the shifted band matrix is singular: a contour node lies on the spectrum");
                }

                var factor = lower[k] / diagonal[k];
                diagonal[k + 1] -= factor * upper[k];
                for (var r = 0; r < q; r++)
                {
                    _x[((k + 1) * q) + r] -= factor * _x[(k * q) + r];
                }
            }
        }

        if (diagonal[n - 1] == Complex.Zero)
        {
            throw new ArithmeticException("the shifted band matrix is singular: a contour node lies on the spectrum");
        }

        for (var k = n - 1; k >= 0; k--)
        {
            var inverse = 1.0 / diagonal[k];
            for (var r = 0; r < q; r++)
            {
                var sum = _x[(k * q) + r];
                if (k + 1 < n)
                {
                    sum -= upper[k] * _x[((k + 1) * q) + r];
                }

                if (k + 2 < n)
                {
                    sum -= fill[k] * _x[((k + 2) * q) + r];
                }

                _x[(k * q) + r] = sum * inverse;
            }
        }
    }

    /// <summary>|Re| + |Im|: a pivot size as good as the modulus for choosing, without the square root.</summary>
    private static double Magnitude(Complex value) => Math.Abs(value.Real) + Math.Abs(value.Imaginary);
}
