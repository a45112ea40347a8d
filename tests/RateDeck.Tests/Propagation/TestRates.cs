using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.Rates;
using RateDeck.States;
using RateDeck.Tests.Support;

namespace RateDeck.Tests.Propagation;

/// <summary>Builds rate matrices directly (the assembler is built elsewhere) for the propagation tests.</summary>
internal static class TestRates
{
    /// <summary>
    /// K from off-diagonal rates (<paramref name="offDiagonal"/>[i, j] is the rate from j to i),
    /// the diagonal set so that each column sums to minus its loss.
    /// </summary>
    public static RateMatrix Build(
        double[,] offDiagonal,
        double[]? loss = null,
        double[]? pumping = null,
        double[]? logPi = null,
        BalanceOrigin origin = BalanceOrigin.TakenAsGiven)
    {
        var n = offDiagonal.GetLength(0);
        loss ??= new double[n];
        var k = DenseMatrix.Create(n, n, 0.0);
        for (var j = 0; j < n; j++)
        {
            var outflow = loss[j];
            for (var i = 0; i < n; i++)
            {
                if (i != j)
                {
                    k[i, j] = offDiagonal[i, j];
                    outflow += offDiagonal[i, j];
                }
            }

            k[j, j] = -outflow;
        }

        return new RateMatrix(States(logPi ?? new double[n]), k, loss, pumping ?? new double[n], origin);
    }

    /// <summary>
    /// A generator completed by detailed balance: <paramref name="towardSmaller"/>(i, j) for i &lt; j is
    /// the rate from j to i, and the rate from i to j is completed as K_ji = K_ij pi_j / pi_i in log space.
    /// </summary>
    public static RateMatrix Completed(
        double[] logWeight,
        Func<int, int, double> towardSmaller,
        double[]? loss = null,
        double[]? pumping = null)
    {
        var n = logWeight.Length;
        var logPi = Normalised(logWeight);
        var rates = new double[n, n];
        for (var j = 0; j < n; j++)
        {
            for (var i = 0; i < j; i++)
            {
                var rate = towardSmaller(i, j);
                rates[i, j] = rate;
                rates[j, i] = rate > 0 ? Math.Exp(Math.Log(rate) + logPi[j] - logPi[i]) : 0.0;
            }
        }

        return Build(rates, loss, pumping, logPi, BalanceOrigin.CompletedByDetailedBalance);
    }

    /// <summary>A rate matrix from a row-major generator as the SciPy fixtures store it (losses are minus the column sums).</summary>
    public static RateMatrix FromRows(double[][] rows, double[] pumping)
    {
        var n = rows.Length;
        var k = DenseMatrix.Create(n, n, (i, j) => rows[i][j]);
        var loss = Enumerable.Range(0, n).Select(j => -k.Column(j).Sum()).ToArray();
        return new RateMatrix(States(new double[n]), k, loss, pumping, BalanceOrigin.TakenAsGiven);
    }

    /// <summary>A state space whose equilibrium is exp(<paramref name="logWeight"/>) normalised.</summary>
    public static StateSpace States(double[] logWeight)
    {
        var n = logWeight.Length;
        var labels = Enumerable.Range(0, n).Select(i => $"s{i}").ToArray();
        var coordinates = Enumerable.Range(0, n).Select(i => (double)i).ToArray();
        return new StateSpace(labels, coordinates, new double[n], logWeight, 1.0, Normalised(logWeight));
    }

    /// <summary>ln pi_i = ln w_i - log-sum-exp(ln w).</summary>
    public static double[] Normalised(double[] logWeight)
    {
        if (logWeight.Length == 0)
        {
            return [];
        }

        var max = logWeight.Max();
        var logZ = max + Math.Log(logWeight.Sum(v => Math.Exp(v - max)));
        return logWeight.Select(v => v - logZ).ToArray();
    }

    /// <summary>The three exact paths, all applicable to a detailed-balance matrix.</summary>
    public static IEnumerable<IPropagator> ExactPaths(RateMatrix rates)
    {
        var la = new ManagedLinearAlgebra();
        yield return new SymmetricEigenPropagator(rates, la);
        yield return new GeneralEigenPropagator(rates, la);
        yield return new PadeExponentialPropagator(rates, TestProvider.Selected);
    }
}
