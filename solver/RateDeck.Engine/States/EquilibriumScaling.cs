namespace RateDeck.States;

/// <summary>
/// The scaled change of variables of the symmetric paths (S = D^(-1/2) K D^(1/2), D = diag(pi)):
/// a vector x (P(0) or s) becomes u_i = x_i exp(-0.5 ln pi_i - c) with
/// c = max_i (ln|x_i| - 0.5 ln pi_i), so that max |u_i| = 1 and nothing overflows, and a result
/// y comes back as P_i = sign(y_i) exp(ln|y_i| + 0.5 ln pi_i + c), formed in one exponent.
/// </summary>
internal sealed class EquilibriumScaling
{
    private readonly double[] _halfLogPi;

    /// <summary>Scaling for the equilibrium ln pi (every entry finite).</summary>
    public EquilibriumScaling(IReadOnlyList<double> logEquilibrium)
    {
        _halfLogPi = logEquilibrium.Select(v => 0.5 * v).ToArray();
        HalfLogRange = _halfLogPi.Length == 0 ? 0.0 : _halfLogPi.Max() - _halfLogPi.Min();
    }

    /// <summary>0.5 (max ln pi - min ln pi).</summary>
    public double HalfLogRange { get; }

    /// <summary>log10(max pi / min pi).</summary>
    public double Decades => 2 * HalfLogRange / Math.Log(10);

    /// <summary>c = max_i (ln|x_i| - 0.5 ln pi_i) over the non-zero x_i; minus infinity when x = 0.</summary>
    public double LogScale(double[] x)
    {
        var logScale = double.NegativeInfinity;
        for (var i = 0; i < x.Length; i++)
        {
            if (x[i] != 0)
            {
                logScale = Math.Max(logScale, Math.Log(Math.Abs(x[i])) - _halfLogPi[i]);
            }
        }

        return logScale;
    }

    /// <summary>max_i sqrt(pi_i) exp(c) / sum |x|, formed in logarithms; 0 when x = 0. Rounding of u is amplified by this much relative to the population.</summary>
    public double Amplification(double[] x)
    {
        var logScale = LogScale(x);
        return double.IsNegativeInfinity(logScale) ? 0.0 : Math.Exp(_halfLogPi.Max() + logScale - Math.Log(x.Sum(Math.Abs)));
    }

    /// <summary>u and c (c = 0 when x = 0).</summary>
    public (double[] Scaled, double LogScale) Scale(double[] x)
    {
        var logScale = LogScale(x);
        if (double.IsNegativeInfinity(logScale))
        {
            logScale = 0.0;
        }

        var u = new double[x.Length];
        for (var i = 0; i < x.Length; i++)
        {
            u[i] = x[i] == 0 ? 0.0 : Math.CopySign(Math.Exp(Math.Log(Math.Abs(x[i])) - _halfLogPi[i] - logScale), x[i]);
        }

        return (u, logScale);
    }

    /// <summary>P_i from y_i and the scale c of the vector y came from.</summary>
    public double Unscale(double y, int i, double logScale) => Unscale(y, _halfLogPi[i] + logScale);

    /// <summary>y exp(logScale) formed in one exponent, so that it overflows only if the product does.</summary>
    public static double Unscale(double y, double logScale) =>
        y == 0 ? 0.0 : Math.CopySign(Math.Exp(Math.Log(Math.Abs(y)) + logScale), y);
}
