namespace RateDeck.Tests.Propagation;

/// <summary>
/// The closed-form solution of a driven two-state system, derived by hand. Pump s into state 1,
/// transfer kf (1 -> 2) and kb (2 -> 1), loss g from state 2:
///   dP1/dt = -kf P1 + kb P2 + s,   dP2/dt = kf P1 - (kb + g) P2.
/// Steady state: the second equation gives P2 = kf P1 / (kb + g); the first then gives
/// kf g P1 / (kb + g) = s, so P1* = s (kb + g) / (kf g) and P2* = s / g (outflow g P2* balances
/// the pump). Transient: P(t) = P* + exp(K t) (P(0) - P*) with K = [[-kf, kb], [kf, -(kb + g)]],
/// trace -(kf + kb + g), determinant kf g, real distinct eigenvalues l+- = (tr +- sqrt(tr^2 - 4 det)) / 2
/// (the discriminant is (kf - g)^2 + kb^2 + 2 kb (kf + g) > 0), and for a 2x2 matrix with distinct
/// eigenvalues Sylvester's formula exp(K t) = [e^(l+ t) (K - l- I) - e^(l- t) (K - l+ I)] / (l+ - l-)
/// (C. Moler and C. Van Loan, SIAM Review 45 (2003) 3, the polynomial interpolation methods).
/// </summary>
internal sealed record DrivenTwoStateSolution(double Kf, double Kb, double Loss, double Pumping)
{
    /// <summary>P1*, P2*.</summary>
    public double[] SteadyState => [Pumping * (Kb + Loss) / (Kf * Loss), Pumping / Loss];

    /// <summary>P(t) from P(0).</summary>
    public double[] At(double[] initial, double t)
    {
        var trace = -(Kf + Kb + Loss);
        var root = Math.Sqrt((trace * trace) - (4 * Kf * Loss));
        var (plus, minus) = ((trace + root) / 2, (trace - root) / 2);
        var (ep, em) = (Math.Exp(plus * t), Math.Exp(minus * t));
        double[,] k = { { -Kf, Kb }, { Kf, -(Kb + Loss) } };
        var steady = SteadyState;
        var result = new double[2];
        for (var i = 0; i < 2; i++)
        {
            result[i] = steady[i];
            for (var j = 0; j < 2; j++)
            {
                var delta = i == j ? 1.0 : 0.0;
                var exponential = ((ep * (k[i, j] - (minus * delta))) - (em * (k[i, j] - (plus * delta)))) / (plus - minus);
                result[i] += exponential * (initial[j] - steady[j]);
            }
        }

        return result;
    }
}
