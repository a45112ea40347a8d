using RateDeck.Propagation;

namespace RateDeck.Sensitivities;

/// <summary>
/// Divided differences of the exponential, the building blocks of the derivative of exp(K t) in the
/// eigenbasis (Daleckii-Krein): for K = X diag(l) X^-1 and a change E of K,
/// d exp(K t) = X [(X^-1 E X) o F(t)] X^-1 with F_mn(t) = t exp[l_m t, l_n t], and the pumped term
/// integrates it once more, t^2 exp[l_m t, l_n t, 0]. Arguments are the scaled nodes z = l t
/// (never positive for a generator, though these formulas do not need that).
/// </summary>
/// <remarks>
/// Nearly equal nodes. The quotient (e^a - e^b) / (a - b) cancels as a -> b. Written with the
/// midpoint m and half-difference d, it is e^m sinh(d) / d, which has no cancellation; it is used
/// while |a - b| &lt; 1, where e^m and sinh(d) cannot overflow for nodes of a generator. Further apart
/// the quotient loses nothing (|e^a - e^b| &gt;= (1 - 1/e) max(e^a, e^b)). The second difference
/// exp[a, b, 0] = (phi1(a) - phi1(b)) / (a - b), phi1(z) = (e^z - 1) / z, cancels when a and b are
/// close relative to max(1, |a|, |b|) (the scale over which phi1 changes): within
/// <see cref="SeriesGap"/> of that scale the midpoint series phi1'(m) + d^2 phi1'''(m) / 6 is used
/// instead, whose next term is (d / scale)^4 ~ 1e-13 of the first; the quotient's cancellation
/// elsewhere costs at most eps * scale / |a - b| &lt;= 2e-13 relative.
/// </remarks>
public static class DividedDifferences
{
    /// <summary>Below this relative gap the second divided difference uses the midpoint series.</summary>
    public const double SeriesGap = 1e-3;

    /// <summary>Terms kept of the Taylor series for |z| &lt; 1: the next is below 1/20! ~ 4e-19 of the first.</summary>
    private const int _seriesTerms = 18;

    /// <summary>1 / ((2k)(2k+1)) for k = 6 down to 1: ratios of successive terms of sinh(d)/d (|d| &lt; 1/2: the next term is below 1e-16).</summary>
    private static readonly double[] _sinhcRatios = [1.0 / 156, 1.0 / 110, 1.0 / 72, 1.0 / 42, 1.0 / 20, 1.0 / 6];

    /// <summary>Taylor coefficients (k+1) / (k+2)! of phi1'.</summary>
    private static readonly double[] _firstDerivativeSeries = Series(k => (k + 1) / Factorial(k + 2));

    /// <summary>Taylor coefficients (k+1)(k+2)(k+3) / (k+4)! of phi1'''.</summary>
    private static readonly double[] _thirdDerivativeSeries = Series(k => (k + 1) * (k + 2) * (k + 3) / Factorial(k + 4));

    /// <summary>exp[a, b] = (e^a - e^b) / (a - b), and e^a when a = b.</summary>
    public static double Exp1(double a, double b) => Exp1(a, b, Math.Exp(a), Math.Exp(b));

    /// <summary>
    /// <see cref="Exp1(double, double)"/> with e^a and e^b already known (a propagation forms them
    /// once per node and time). Close nodes take e^m = sqrt(e^a e^b) unless that product underflows,
    /// and sinh(d)/d by its Taylor series.
    /// </summary>
    public static double Exp1(double a, double b, double expA, double expB)
    {
        var gap = a - b;
        if (Math.Abs(gap) >= 1)
        {
            return (expA - expB) / gap;
        }

        var product = expA * expB;
        var middle = product > 1e-290 ? Math.Sqrt(product) : Math.Exp(0.5 * (a + b));
        var h2 = 0.25 * gap * gap;
        var sinhc = 1.0;
        foreach (var ratio in _sinhcRatios)
        {
            sinhc = 1 + (h2 * ratio * sinhc);
        }

        return middle * sinhc;
    }

    /// <summary>exp[a, b, 0], the second divided difference of the exponential at a, b and 0.</summary>
    public static double Exp2AtZero(double a, double b) => Exp2AtZero(a, b, SpectralFunctions.Phi1(a), SpectralFunctions.Phi1(b));

    /// <summary><see cref="Exp2AtZero(double, double)"/> with phi1(a) and phi1(b) already known.</summary>
    public static double Exp2AtZero(double a, double b, double phiA, double phiB)
    {
        var scale = Math.Max(1, Math.Max(Math.Abs(a), Math.Abs(b)));
        var gap = a - b;
        if (Math.Abs(gap) > SeriesGap * scale)
        {
            return (phiA - phiB) / gap;
        }

        var middle = 0.5 * (a + b);
        var half = 0.5 * gap;
        return Phi1FirstDerivative(middle) + (half * half * Phi1ThirdDerivative(middle) / 6);
    }

    /// <summary>phi1'(z) = (1 + e^z (z - 1)) / z^2; its Taylor series for |z| &lt; 1.</summary>
    private static double Phi1FirstDerivative(double z) =>
        Math.Abs(z) >= 1 ? (1 + (Math.Exp(z) * (z - 1))) / (z * z) : Horner(_firstDerivativeSeries, z);

    /// <summary>phi1'''(z) = e^z / z - 3 e^z / z^2 + 6 e^z / z^3 - 6 (e^z - 1) / z^4; its Taylor series for |z| &lt; 1.</summary>
    private static double Phi1ThirdDerivative(double z)
    {
        if (Math.Abs(z) < 1)
        {
            return Horner(_thirdDerivativeSeries, z);
        }

        var e = Math.Exp(z);
        return (e / z) - (3 * e / (z * z)) + (6 * e / (z * z * z)) - (6 * (e - 1) / (z * z * z * z));
    }

    private static double Horner(double[] coefficients, double z)
    {
        var sum = 0.0;
        for (var k = coefficients.Length - 1; k >= 0; k--)
        {
            sum = (sum * z) + coefficients[k];
        }

        return sum;
    }

    private static double[] Series(Func<int, double> coefficient) => [.. Enumerable.Range(0, _seriesTerms).Select(coefficient)];

    private static double Factorial(int k) => Enumerable.Range(1, k).Aggregate(1.0, (product, i) => product * i);
}
