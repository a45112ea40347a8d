using System.Runtime.CompilerServices;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;

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
    /// equal and finite. Only meaningful when detailed balance holds. Reads and writes the
    /// column-major storage directly, compiled optimised at once: it runs once per run over N^2 / 2 pairs.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static DenseMatrix Build(RateMatrix rates)
    {
        var n = rates.Count;
        var k = rates.Generator.Values;
        var logPi = rates.States.LogEquilibrium;
        var s = new double[(long)n * n];
        for (var j = 0; j < n; j++)
        {
            var column = (long)j * n;
            s[column + j] = k[column + j];
            for (var i = j + 1; i < n; i++)
            {
                var value = Entry(k[column + i], k[((long)i * n) + j], logPi[i], logPi[j]);
                s[column + i] = value;
                s[((long)i * n) + j] = value;
            }
        }

        return new DenseMatrix(n, n, s);
    }

    /// <summary>
    /// S in double-double, column-major N x N, for the extended-precision eigen-solver. Kept exactly
    /// in the form whose eigenvalues the rates determine to high relative accuracy (a weighted graph
    /// Laplacian with the diagonal scaling of pi): S_jj = -(sum_(i != j) K_ij + loss_j) summed in
    /// double-double from the stored rates, never the stored K_jj, and S_ij = sqrt(K_ij K_ji), the product exact and the root in double-double, so
    /// that S_ij^2 = K_ij K_ji for the very rates summed into the diagonals. Then the cancellation
    /// that fixes a slow mode (a fast rate's diagonal against its two off-diagonals) happens at
    /// 2^-104 instead of 2^-53. A pair whose completed rate underflowed takes the log-space
    /// <see cref="Entry"/>.
    /// </summary>
    public static LinearAlgebra.DoubleDouble[] BuildExtended(RateMatrix rates)
    {
        var n = rates.Count;
        var k = rates.Generator;
        var logPi = rates.States.LogEquilibrium;
        var s = new LinearAlgebra.DoubleDouble[n * n];
        for (var j = 0; j < n; j++)
        {
            var outflow = (LinearAlgebra.DoubleDouble)rates.Loss[j];
            for (var i = 0; i < n; i++)
            {
                if (i == j)
                {
                    continue;
                }

                outflow += k[i, j];
                if (i > j)
                {
                    var (upper, lower) = (k[i, j], k[j, i]);
                    var value = upper > 0 && lower > 0
                        ? LinearAlgebra.DoubleDouble.Sqrt(LinearAlgebra.DoubleDouble.Product(upper, lower))
                        : (LinearAlgebra.DoubleDouble)Entry(upper, lower, logPi[i], logPi[j]);
                    s[(j * n) + i] = value;
                    s[(i * n) + j] = value;
                }
            }

            s[(j * n) + j] = -outflow;
        }

        return s;
    }

    /// <summary>
    /// The lower band of S for a sparse K of bandwidth b, in LAPACK's symmetric band layout
    /// (UPLO = 'L'): S_ij for j &lt;= i &lt;= j + b at [j (b + 1) + (i - j)]. O(N b) memory.
    /// </summary>
    public static SymmetricBand BuildBand(RateMatrix rates)
    {
        var sparse = rates.Sparse ?? throw new ArgumentException("the rate matrix is dense; use Build", nameof(rates));
        var n = rates.Count;
        var b = sparse.Bandwidth;
        var logPi = rates.States.LogEquilibrium;
        var lower = new double[n * (b + 1)];
        for (var j = 0; j < n; j++)
        {
            lower[j * (b + 1)] = sparse[j, j];
            for (var i = j + 1; i <= Math.Min(n - 1, j + b); i++)
            {
                lower[(j * (b + 1)) + i - j] = Entry(sparse[i, j], sparse[j, i], logPi[i], logPi[j]);
            }
        }

        return new SymmetricBand(n, b, lower);
    }

    /// <summary>S_ij = S_ji from K_ij = <paramref name="upper"/> and K_ji = <paramref name="lower"/>, through the larger of the two.</summary>
    private static double Entry(double upper, double lower, double logPiI, double logPiJ) => upper >= lower
        ? (upper > 0 ? Math.Exp(Math.Log(upper) + (0.5 * (logPiJ - logPiI))) : 0.0)
        : Math.Exp(Math.Log(lower) + (0.5 * (logPiI - logPiJ)));
}
