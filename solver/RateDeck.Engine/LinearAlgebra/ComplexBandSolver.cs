using System.Numerics;

namespace RateDeck.LinearAlgebra;

/// <summary>
/// Solves (z I - t S) X = B for a real symmetric band matrix S (bandwidth b), a complex shift z
/// and real right-hand sides, by Gaussian elimination with partial pivoting in band storage
/// (the scheme of LAPACK's zgbsv: pivoting widens the upper band to 2b). Row i keeps columns
/// i - b .. i + 2b, which holds every entry elimination can create. O(N b^2) time per solve,
/// O(N b) memory, allocated once; backward stable like any partially pivoted elimination.
/// A tridiagonal S (b = 1) takes the same elimination with the same pivots and operations in one
/// pass each way without the band loops (the scheme of LAPACK's zgtsv), which moves a third of the
/// memory: at 100,000 states the solves are bound by memory, not arithmetic.
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
    /// (z I - t S) X = B for a tridiagonal S, in one pass down and one up. At step k the pivot is
    /// the larger of the current diagonal entry and the entry below it, rows swapped when the lower
    /// one is strictly larger, as in the band scheme, with the same operations on each entry. The
    /// entries of z I - t S and of B are read as the pass reaches them; only what the substitution
    /// needs is stored: each row's diagonal, upper and fill-in (second upper) entries.
    /// </summary>
    private void SolveTridiagonal(Complex z, double t, IReadOnlyList<double[]> b)
    {
        var n = _n;
        var q = _rightSides;
        var diagonals = _a.AsSpan(0, n);
        var uppers = _a.AsSpan(n, n);
        var fills = _a.AsSpan(2 * n, n);
        var s = _s.Lower;
        Complex Off(int k) => k < n - 1 ? new Complex(-t * s[(2 * k) + 1], 0) : Complex.Zero;
        for (var r = 0; r < q; r++)
        {
            _x[r] = b[r][0];
        }

        // The current row's diagonal and upper entries, as elimination has changed them.
        var (diagonal, upper) = (z - (t * s[0]), Off(0));
        for (var k = 0; k < n - 1; k++)
        {
            var lower = Off(k);
            var next = z - (t * s[2 * (k + 1)]);
            var nextUpper = Off(k + 1);
            fills[k] = Complex.Zero;
            if (Magnitude(lower) > Magnitude(diagonal))
            {
                // Swap rows k and k + 1, then eliminate with the old diagonal entry below.
                var factor = diagonal / lower;
                diagonals[k] = lower;
                uppers[k] = next;
                var below = upper - (factor * next);
                if (k < n - 2)
                {
                    fills[k] = nextUpper;
                    nextUpper = -factor * nextUpper;
                }

                for (var r = 0; r < q; r++)
                {
                    var top = _x[(k * q) + r];
                    var incoming = b[r][k + 1];
                    _x[(k * q) + r] = incoming;
                    _x[((k + 1) * q) + r] = top - (factor * incoming);
                }

                (diagonal, upper) = (below, nextUpper);
            }
            else
            {
                if (diagonal == Complex.Zero)
                {
                    throw new ArithmeticException("the shifted band matrix is singular: a contour node lies on the spectrum");
                }

                var factor = lower / diagonal;
                diagonals[k] = diagonal;
                uppers[k] = upper;
                for (var r = 0; r < q; r++)
                {
                    _x[((k + 1) * q) + r] = b[r][k + 1] - (factor * _x[(k * q) + r]);
                }

                (diagonal, upper) = (next - (factor * upper), nextUpper);
            }
        }

        if (diagonal == Complex.Zero)
        {
            throw new ArithmeticException("the shifted band matrix is singular: a contour node lies on the spectrum");
        }

        (diagonals[n - 1], uppers[n - 1], fills[n - 1]) = (diagonal, upper, Complex.Zero);
        for (var k = n - 1; k >= 0; k--)
        {
            var inverse = 1.0 / diagonals[k];
            for (var r = 0; r < q; r++)
            {
                var sum = _x[(k * q) + r];
                if (k + 1 < n)
                {
                    sum -= uppers[k] * _x[((k + 1) * q) + r];
                }

                if (k + 2 < n)
                {
                    sum -= fills[k] * _x[((k + 2) * q) + r];
                }

                _x[(k * q) + r] = sum * inverse;
            }
        }
    }

    /// <summary>|Re| + |Im|: a pivot size as good as the modulus for choosing, without the square root.</summary>
    private static double Magnitude(Complex value) => Math.Abs(value.Real) + Math.Abs(value.Imaginary);
}
