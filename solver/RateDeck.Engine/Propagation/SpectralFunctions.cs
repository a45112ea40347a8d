using System.Numerics;

namespace RateDeck.Propagation;

/// <summary>Scalar functions shared by the eigen-decomposition propagators.</summary>
internal static class SpectralFunctions
{
    /// <summary>
    /// phi1(z) = (e^z - 1) / z with phi1(0) = 1, accurate to a few ulps for every real z by
    /// Kahan's trick phi1 = (u - 1) / ln u with u = fl(e^z) (Higham, "Accuracy and Stability of
    /// Numerical Algorithms", 2nd ed., SIAM 2002, section 1.14.1; quoted from memory).
    /// </summary>
    public static double Phi1(double z)
    {
        var u = Math.Exp(z);
        if (u == 1.0)
        {
            return 1.0; // |z| is below half an ulp of 1: phi1 = 1 + z/2 + ... rounds to 1.
        }

        var uMinusOne = u - 1.0;
        if (uMinusOne == -1.0)
        {
            return -1.0 / z; // e^z is negligible against 1.
        }

        return double.IsPositiveInfinity(u) ? double.PositiveInfinity : uMinusOne / Math.Log(u);
    }

    /// <summary>
    /// Complex phi1(z): the Taylor series sum z^k / (k+1)! for |z| &lt; 1 (at most 18 terms to
    /// reach 1e-17), (e^z - 1) / z otherwise, where the subtraction loses nothing that matters
    /// because |e^z - 1| is then not small against 1 except near the isolated zeros 2 pi i k,
    /// where the absolute error stays eps.
    /// </summary>
    public static Complex Phi1(Complex z)
    {
        if (z.Imaginary == 0)
        {
            return Phi1(z.Real);
        }

        if (Complex.Abs(z) >= 1)
        {
            return (Complex.Exp(z) - 1) / z;
        }

        var term = Complex.One;
        var sum = Complex.One;
        for (var k = 2; k < 30 && Complex.Abs(term) > 1e-17; k++)
        {
            term *= z / k;
            sum += term;
        }

        return sum;
    }
}
