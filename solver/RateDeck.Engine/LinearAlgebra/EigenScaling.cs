using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.LinearAlgebra;

/// <summary>
/// The power of two by which a matrix is multiplied before an eigen-decomposition so that the
/// solver's squares and sums of squares can neither overflow nor underflow, as LAPACK's drivers
/// scale into their safe range first (dsyev_, dgeev_: "scale matrix to allowable range"). A
/// power of two changes no digit, the eigenvectors are those of the scaled matrix, and the
/// eigenvalues are divided by the factor afterwards. Matrices whose largest |entry| lies in
/// [2^-450, 2^450], every deck of ordinary rates, are left alone (factor 1). Others are brought
/// to a largest entry of 2^450, the top of that range, which leaves the most room below it: the
/// small entries of a matrix spanning 10^300 keep their digits (and a double-double value its
/// low part) instead of falling into the subnormal range.
/// </summary>
internal static class EigenScaling
{
    private const int _safeExponent = 450;

    /// <summary>The factor for a matrix whose largest |entry| is <paramref name="maxAbs"/>: 1 in the safe range, else the power of two bringing it to 2^450 (at most 2^1000, which a double holds).</summary>
    public static double Factor(double maxAbs)
    {
        if (maxAbs == 0 || !double.IsFinite(maxAbs) || Math.Abs(Math.ILogB(maxAbs)) <= _safeExponent)
        {
            return 1;
        }

        return Math.ScaleB(1, Math.Clamp(_safeExponent - Math.ILogB(maxAbs), -1000, 1000));
    }

    /// <summary>
    /// The copy of <paramref name="matrix"/> that MathNet's eigen-solvers are given, and its factor:
    /// scaled as above, and with every entry below 2^-600 of the largest set to zero. MathNet's QL
    /// iteration (the EISPACK tql2 form) divides a diagonal difference by twice an off-diagonal
    /// entry without guarding the quotient, and an entry 1e320 times smaller than the diagonal (a
    /// rate of 1e-307 beside one of 1e15) turns it into infinity and then NaN. An entry that small
    /// lies some 1e164 below the solver's backward error (eps ||A||), so no digit it resolves changes.
    /// </summary>
    public static (DenseMatrix Matrix, double Factor) ForManagedSolver(DenseMatrix matrix)
    {
        var values = matrix.Values;
        var max = values.Aggregate(0.0, (m, v) => Math.Max(m, Math.Abs(v)));
        var factor = Factor(max);
        var negligible = Math.ScaleB(max * factor, -600);
        return ((DenseMatrix)matrix.Map(v => Math.Abs(v * factor) < negligible ? 0.0 : v * factor), factor);
    }

    /// <summary>The factor for <paramref name="values"/> (see <see cref="Factor(double)"/>).</summary>
    public static double Factor(IEnumerable<double> values) => Factor(values.Aggregate(0.0, (max, v) => Math.Max(max, Math.Abs(v))));
}
