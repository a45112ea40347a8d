using RateDeck.Rates;

namespace RateDeck.Tests.Propagation;

/// <summary>Builds the sparse twin of a dense rate matrix, for comparing the sparse and dense paths.</summary>
internal static class SparseRates
{
    /// <summary>The same K, loss, pumping and states, stored in compressed columns (non-zeros and the diagonal).</summary>
    public static RateMatrix ToSparse(RateMatrix dense)
    {
        var n = dense.Count;
        var k = dense.Generator;
        var starts = new int[n + 1];
        var rows = new List<int>();
        var values = new List<double>();
        for (var j = 0; j < n; j++)
        {
            for (var i = 0; i < n; i++)
            {
                if (k[i, j] != 0 || i == j)
                {
                    rows.Add(i);
                    values.Add(k[i, j]);
                }
            }

            starts[j + 1] = rows.Count;
        }

        return new RateMatrix(dense.States, new SparseGenerator(n, starts, [.. rows], [.. values]), dense.Loss, dense.Pumping, dense.Origin, "sparse (test)");
    }

    /// <summary>A nearest-neighbour ladder completed by detailed balance: downward rate <paramref name="rate"/>, ln w_i = -<paramref name="slope"/> i.</summary>
    public static RateMatrix Ladder(int n, double rate, double slope = 0.0, double[]? loss = null, double[]? pumping = null) =>
        TestRates.Completed([.. Enumerable.Range(0, n).Select(i => -slope * i)], (i, j) => j == i + 1 ? rate : 0.0, loss, pumping);
}
