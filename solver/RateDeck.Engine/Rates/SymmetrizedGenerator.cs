using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.Rates;

/// <summary>
/// S = D^(-1/2) K D^(1/2) with D = diag(pi), i.e. S_ij = K_ij sqrt(pi_j / pi_i) (SPEC 2).
/// Under detailed balance S is symmetric with the same eigenvalues as K.
/// </summary>
public static class SymmetrizedGenerator
{
    /// <summary>
    /// Builds S from the larger rate of each pair, in log space: a completed rate may have
    /// underflowed to zero while its partner is finite, and S_ij = S_ji must still come out
    /// equal and finite. Only meaningful when detailed balance holds.
    /// </summary>
    public static DenseMatrix Build(RateMatrix rates)
    {
        var n = rates.Count;
        var k = rates.Generator;
        var logPi = rates.States.LogEquilibrium;
        var s = DenseMatrix.Create(n, n, 0.0);
        for (var j = 0; j < n; j++)
        {
            s[j, j] = k[j, j];
            for (var i = j + 1; i < n; i++)
            {
                var upper = k[i, j];
                var lower = k[j, i];
                double value;
                if (upper >= lower)
                {
                    value = upper > 0 ? Math.Exp(Math.Log(upper) + 0.5 * (logPi[j] - logPi[i])) : 0.0;
                }
                else
                {
                    value = Math.Exp(Math.Log(lower) + 0.5 * (logPi[i] - logPi[j]));
                }

                s[i, j] = value;
                s[j, i] = value;
            }
        }

        return s;
    }
}
