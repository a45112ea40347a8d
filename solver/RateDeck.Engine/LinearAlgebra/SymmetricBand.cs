namespace RateDeck.LinearAlgebra;

/// <summary>
/// A real symmetric band matrix of order <paramref name="Count"/> and bandwidth
/// <paramref name="Bandwidth"/>, lower band stored as LAPACK's UPLO = 'L' layout with
/// LDAB = b + 1: element (i, j), j &lt;= i &lt;= j + b, at <paramref name="Lower"/>[j (b + 1) + (i - j)].
/// </summary>
public sealed record SymmetricBand(int Count, int Bandwidth, double[] Lower)
{
    /// <summary>Element (i, j) of the full symmetric matrix (zero outside the band).</summary>
    public double this[int i, int j]
    {
        get
        {
            if (i < j)
            {
                (i, j) = (j, i);
            }

            return i - j > Bandwidth ? 0.0 : Lower[(j * (Bandwidth + 1)) + i - j];
        }
    }

    /// <summary>The diagonal, a copy.</summary>
    public double[] Diagonal() => [.. Enumerable.Range(0, Count).Select(j => Lower[j * (Bandwidth + 1)])];

    /// <summary>The first sub-diagonal (N - 1 entries), a copy.</summary>
    public double[] SubDiagonal() => Bandwidth == 0 ? new double[Math.Max(Count - 1, 0)] : [.. Enumerable.Range(0, Math.Max(Count - 1, 0)).Select(j => Lower[(j * (Bandwidth + 1)) + 1])];
}
