namespace RateDeck.Mechanics;

/// <summary>
/// Bracketed one-dimensional root finding and minimisation, both after Brent,
/// "Algorithms for Minimization without Derivatives" (1973), ch. 4 (zeroin) and ch. 5 (localmin).
/// </summary>
internal static class ScalarSolvers
{
    private const int _maxIterations = 300;
    private const double _machineEpsilon = 2.220446049250313e-16;
    private const double _goldenSection = 0.3819660112501051;

    /// <summary>
    /// A root of <paramref name="f"/> in [a, b], where f(a) and f(b) differ in sign; stops when the
    /// bracket is below <paramref name="tolerance"/> + 4 eps |x|. An infinite value is allowed at an
    /// end (a wall, or the edge of the Lagrangian's domain): the step is then a bisection, because
    /// secant and inverse quadratic steps through an infinite value are meaningless.
    /// </summary>
    public static double FindRoot(Func<double, double> f, double a, double b, double fa, double fb, double tolerance)
    {
        if (fa == 0)
        {
            return a;
        }

        if (fb == 0)
        {
            return b;
        }

        double c = b, fc = fb, d = b - a, e = d;
        for (var iteration = 0; iteration < _maxIterations; iteration++)
        {
            if ((fb > 0) == (fc > 0))
            {
                c = a;
                fc = fa;
                d = b - a;
                e = d;
            }

            if (Math.Abs(fc) < Math.Abs(fb))
            {
                (a, b, c) = (b, c, b);
                (fa, fb, fc) = (fb, fc, fb);
            }

            var tol = 2 * double.Epsilon + 2 * _machineEpsilon * Math.Abs(b) + 0.5 * tolerance;
            var half = 0.5 * (c - b);
            if (Math.Abs(half) <= tol || fb == 0)
            {
                return b;
            }

            var interpolate = Math.Abs(e) >= tol && Math.Abs(fa) > Math.Abs(fb)
                && double.IsFinite(fa) && double.IsFinite(fb) && double.IsFinite(fc);
            if (interpolate)
            {
                double p, q;
                var s = fb / fa;
                if (a == c)
                {
                    p = 2 * half * s;
                    q = 1 - s;
                }
                else
                {
                    var qa = fa / fc;
                    var r = fb / fc;
                    p = s * (2 * half * qa * (qa - r) - (b - a) * (r - 1));
                    q = (qa - 1) * (r - 1) * (s - 1);
                }

                if (p > 0)
                {
                    q = -q;
                }

                p = Math.Abs(p);
                if (2 * p < Math.Min(3 * half * q - Math.Abs(tol * q), Math.Abs(e * q)))
                {
                    e = d;
                    d = p / q;
                }
                else
                {
                    d = half;
                    e = d;
                }
            }
            else
            {
                d = half;
                e = d;
            }

            a = b;
            fa = fb;
            b += Math.Abs(d) > tol ? d : Math.CopySign(tol, half);
            fb = f(b);
        }

        return b;
    }

    /// <summary>
    /// Narrows a root estimate <paramref name="x"/> (from <see cref="FindRoot"/>, good to a few
    /// units in the last place) to the double next to the sign change of <paramref name="f"/> with
    /// the smaller |f|: a bracket of adjacent doubles by outward steps of 1, 2, 4, ... ulps, then
    /// bisection. Turning points need this: an orbit's period is sensitive to them near the ends.
    /// Returns x unchanged when no sign change lies within 2^20 ulps.
    /// </summary>
    public static double PolishRoot(Func<double, double> f, double x)
    {
        var fx = f(x);
        if (fx == 0 || !double.IsFinite(x))
        {
            return x;
        }

        var ulp = Math.BitIncrement(Math.Abs(x)) - Math.Abs(x);
        for (var reach = ulp; reach <= 1048576 * ulp; reach *= 2)
        {
            foreach (var other in (ReadOnlySpan<double>)[x + reach, x - reach])
            {
                var fo = f(other);
                if ((fo > 0) != (fx > 0) || fo == 0)
                {
                    return Bisect(f, x, fx, other, fo);
                }
            }
        }

        return x;
    }

    private static double Bisect(Func<double, double> f, double a, double fa, double b, double fb)
    {
        while (true)
        {
            var middle = 0.5 * (a + b);
            if (middle == a || middle == b || fb == 0)
            {
                return Math.Abs(fa) <= Math.Abs(fb) ? a : b;
            }

            var fm = f(middle);
            if ((fm > 0) == (fa > 0) && fm != 0)
            {
                (a, fa) = (middle, fm);
            }
            else
            {
                (b, fb) = (middle, fm);
            }
        }
    }

    /// <summary>
    /// The minimum of <paramref name="f"/> in [a, c] given an interior point b with f(b) below both
    /// ends: golden-section steps with parabolic interpolation. Stops when the bracket is below
    /// <paramref name="relativeTolerance"/> |x| + <paramref name="absoluteTolerance"/>; a smooth
    /// minimum cannot be located better than about sqrt(eps) relative, a kink can.
    /// </summary>
    public static (double X, double Value) Minimize(
        Func<double, double> f, double a, double b, double c, double fb, double relativeTolerance, double absoluteTolerance)
    {
        var low = Math.Min(a, c);
        var high = Math.Max(a, c);
        double x = b, w = b, v = b, fx = fb, fw = fb, fv = fb, d = 0, e = 0;
        for (var iteration = 0; iteration < _maxIterations; iteration++)
        {
            var middle = 0.5 * (low + high);
            var tol1 = relativeTolerance * Math.Abs(x) + absoluteTolerance;
            var tol2 = 2 * tol1;
            if (Math.Abs(x - middle) <= tol2 - 0.5 * (high - low))
            {
                break;
            }

            var golden = true;
            if (Math.Abs(e) > tol1)
            {
                var r = (x - w) * (fx - fv);
                var q = (x - v) * (fx - fw);
                var p = (x - v) * q - (x - w) * r;
                q = 2 * (q - r);
                if (q > 0)
                {
                    p = -p;
                }

                q = Math.Abs(q);
                var previous = e;
                e = d;
                if (Math.Abs(p) < Math.Abs(0.5 * q * previous) && p > q * (low - x) && p < q * (high - x))
                {
                    d = p / q;
                    golden = false;
                    var trial = x + d;
                    if (trial - low < tol2 || high - trial < tol2)
                    {
                        d = Math.CopySign(tol1, middle - x);
                    }
                }
            }

            if (golden)
            {
                e = x >= middle ? low - x : high - x;
                d = _goldenSection * e;
            }

            var u = Math.Abs(d) >= tol1 ? x + d : x + Math.CopySign(tol1, d);
            var fu = f(u);
            if (fu <= fx)
            {
                if (u >= x)
                {
                    low = x;
                }
                else
                {
                    high = x;
                }

                (v, w, x) = (w, x, u);
                (fv, fw, fx) = (fw, fx, fu);
            }
            else
            {
                if (u < x)
                {
                    low = u;
                }
                else
                {
                    high = u;
                }

                if (fu <= fw || w == x)
                {
                    (v, w) = (w, u);
                    (fv, fw) = (fw, fu);
                }
                else if (fu <= fv || v == x || v == w)
                {
                    v = u;
                    fv = fu;
                }
            }
        }

        return (x, fx);
    }
}
