using RateDeck.LinearAlgebra;
using RateDeck.Rates;

namespace RateDeck.Diagnostics;

/// <summary>
/// The block -K_UU of the generator on a set of states U, factored as the M-matrix it is
/// (<see cref="MMatrixFactorization"/>): off-diagonal magnitudes K_ij for i, j in U, and for each
/// column j the excess loss_j + sum over i outside U of K_ij, the rate leaving U from j. The
/// diagonal is never read from K, so the factors are accurate to a few units of roundoff relative
/// to themselves however far the rates spread. A dense K gives a dense block; a sparse K a band
/// block whose half-width is the widest stored pair inside U (at most K's bandwidth, since U's
/// states keep their order). The rates must be non-negative off the diagonal.
/// </summary>
public static class GeneratorBlock
{
    /// <summary>Factors -K_UU for the states <paramref name="states"/> (ascending).</summary>
    /// <exception cref="SingularMatrixException">Some states of U have no way out of U and no loss.</exception>
    public static MMatrixFactorization Factor(RateMatrix rates, IReadOnlyList<int> states)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(states);
        var u = states.Count;
        var position = new int[rates.Count];
        Array.Fill(position, -1);
        for (var a = 0; a < u; a++)
        {
            position[states[a]] = a;
        }

        var excess = new double[u];
        for (var b = 0; b < u; b++)
        {
            excess[b] = rates.Loss[states[b]];
        }

        if (rates.Sparse is not { } sparse)
        {
            var offDiagonal = new double[u * u];
            var k = rates.Generator.Values;
            var n = rates.Count;
            for (var b = 0; b < u; b++)
            {
                var from = states[b];
                for (var to = 0; to < n; to++)
                {
                    if (to != from)
                    {
                        Place(offDiagonal, (b * u) + position[to], position[to], excess, b, k[(from * n) + to]);
                    }
                }
            }

            return MMatrixFactorization.Factor(u, offDiagonal, excess);
        }

        var bandwidth = 0;
        foreach (var from in states)
        {
            for (var p = sparse.ColumnStarts[from]; p < sparse.ColumnStarts[from + 1]; p++)
            {
                if (position[sparse.RowIndices[p]] >= 0)
                {
                    bandwidth = Math.Max(bandwidth, Math.Abs(position[sparse.RowIndices[p]] - position[from]));
                }
            }
        }

        var band = new double[u * ((2 * bandwidth) + 1)];
        for (var b = 0; b < u; b++)
        {
            var from = states[b];
            for (var p = sparse.ColumnStarts[from]; p < sparse.ColumnStarts[from + 1]; p++)
            {
                var to = sparse.RowIndices[p];
                if (to != from)
                {
                    Place(band, (b * ((2 * bandwidth) + 1)) + position[to] - b + bandwidth, position[to], excess, b, sparse.Values[p]);
                }
            }
        }

        return MMatrixFactorization.FactorBand(u, bandwidth, band, excess);
    }

    /// <summary>True when some off-diagonal rate is negative (a deck that fails its check): -K is then no M-matrix.</summary>
    public static bool HasNegativeOffDiagonal(RateMatrix rates)
    {
        ArgumentNullException.ThrowIfNull(rates);
        var negative = false;
        rates.ForEachOffDiagonal((_, _, rate) => negative |= rate < 0);
        return negative;
    }

    /// <summary>A rate from the b-th state of U: into the block at <paramref name="slot"/> when its target is in U, else onto the excess.</summary>
    private static void Place(double[] block, int slot, int target, double[] excess, int b, double rate)
    {
        if (target >= 0)
        {
            block[slot] = rate;
        }
        else
        {
            excess[b] += rate;
        }
    }
}
