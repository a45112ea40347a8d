namespace RateDeck.LinearAlgebra;

/// <summary>
/// A double-double number Hi + Lo with |Lo| &lt;= ulp(Hi) / 2: about 32 significant digits
/// (unit roundoff 2^-104 ~ 4.9e-32 for + and *), from the error-free transformations of Dekker
/// (Numer. Math. 18 (1971) 224) and Knuth (TAOCP vol. 2, sec. 4.2.2): TwoSum, and TwoProd by a
/// fused multiply-add. Used where double precision loses what a stiff deck needs: the slow modes
/// of a generator whose spectral radius is 10^15 or more times larger.
/// </summary>
public readonly record struct DoubleDouble(double Hi, double Lo)
{
    /// <summary>Unit roundoff of + and *, 2^-104.</summary>
    public const double Epsilon = 4.930380657631324e-32;

    /// <summary>ln 2 to double-double precision (mpmath at 50 digits: 0.6931471805599453 + 2.3190468138462996e-17).</summary>
    private static readonly DoubleDouble _ln2 = new(0.6931471805599453, 2.3190468138462996e-17);

    /// <summary>Zero.</summary>
    public static DoubleDouble Zero => default;

    /// <summary>One.</summary>
    public static DoubleDouble One => new(1, 0);

    /// <summary>The nearest double.</summary>
    public double Value => Hi + Lo;

    /// <summary>A double, exactly.</summary>
    public static implicit operator DoubleDouble(double value) => new(value, 0);

    /// <summary>Sum of two doubles, exactly.</summary>
    public static DoubleDouble Sum(double a, double b)
    {
        var s = a + b;
        var v = s - a;
        return new(s, (a - (s - v)) + (b - v));
    }

    /// <summary>Product of two doubles, exactly (barring underflow).</summary>
    public static DoubleDouble Product(double a, double b)
    {
        var p = a * b;
        return new(p, Math.FusedMultiplyAdd(a, b, -p));
    }

    /// <summary>x + y.</summary>
    public static DoubleDouble operator +(DoubleDouble x, DoubleDouble y)
    {
        var s = Sum(x.Hi, y.Hi);
        var t = Sum(x.Lo, y.Lo);
        var head = Renormalize(s.Hi, s.Lo + t.Hi);
        return Renormalize(head.Hi, head.Lo + t.Lo);
    }

    /// <summary>-x.</summary>
    public static DoubleDouble operator -(DoubleDouble x) => new(-x.Hi, -x.Lo);

    /// <summary>x - y.</summary>
    public static DoubleDouble operator -(DoubleDouble x, DoubleDouble y) => x + (-y);

    /// <summary>x * y.</summary>
    public static DoubleDouble operator *(DoubleDouble x, DoubleDouble y)
    {
        var p = Product(x.Hi, y.Hi);
        return Renormalize(p.Hi, p.Lo + ((x.Hi * y.Lo) + (x.Lo * y.Hi)));
    }

    /// <summary>x / y by three correction steps of the long division.</summary>
    public static DoubleDouble operator /(DoubleDouble x, DoubleDouble y)
    {
        var q1 = x.Hi / y.Hi;
        var r = x - (y * q1);
        var q2 = r.Hi / y.Hi;
        r -= y * q2;
        var q3 = r.Hi / y.Hi;
        return Renormalize(q1, q2) + q3;
    }

    /// <summary>x &lt; y.</summary>
    public static bool operator <(DoubleDouble x, DoubleDouble y) => x.Hi < y.Hi || (x.Hi == y.Hi && x.Lo < y.Lo);

    /// <summary>x &gt; y.</summary>
    public static bool operator >(DoubleDouble x, DoubleDouble y) => y < x;

    /// <summary>|x|.</summary>
    public static DoubleDouble Abs(DoubleDouble x) => x.Hi < 0 || (x.Hi == 0 && x.Lo < 0) ? -x : x;

    /// <summary>sqrt(x) for x &gt;= 0: the double root and one Newton step done in double-double.</summary>
    public static DoubleDouble Sqrt(DoubleDouble x)
    {
        if (x.Hi <= 0)
        {
            return Zero;
        }

        var s = Math.Sqrt(x.Hi);
        var residual = x - Product(s, s);
        return Sum(s, residual.Hi / (2 * s));
    }

    /// <summary>
    /// e^x: x = k ln 2 + r with |r| &lt;= ln 2 / 2, the Taylor series of e^(r / 1024) to below
    /// 1e-34, squared ten times, then scaled by 2^k exactly. Underflows to 0 below about -745.
    /// </summary>
    public static DoubleDouble Exp(DoubleDouble x)
    {
        if (x.Hi < -745.2)
        {
            return Zero;
        }

        var k = Math.Round(x.Hi / _ln2.Hi);
        var r = (x - (_ln2 * k)) * (1.0 / 1024);
        var term = One;
        var sum = One;
        for (var n = 1; n < 40 && Math.Abs(term.Hi) > 1e-35; n++)
        {
            term = term * r / n;
            sum += term;
        }

        for (var squaring = 0; squaring < 10; squaring++)
        {
            sum *= sum;
        }

        return new(Math.ScaleB(sum.Hi, (int)k), Math.ScaleB(sum.Lo, (int)k));
    }

    /// <summary>e^x - 1 without cancellation for small |x| (its Taylor series below |x| = 1/2).</summary>
    public static DoubleDouble ExpMinusOne(DoubleDouble x)
    {
        if (Math.Abs(x.Hi) >= 0.5)
        {
            return Exp(x) - One;
        }

        var term = x;
        var sum = x;
        for (var n = 2; n < 60 && Math.Abs(term.Hi) > 1e-35 * Math.Abs(sum.Hi); n++)
        {
            term = term * x / n;
            sum += term;
        }

        return sum;
    }

    private static DoubleDouble Renormalize(double a, double b)
    {
        var s = a + b;
        return new(s, b - (s - a));
    }
}
