using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.Bench;

/// <summary>
/// Benchmark matrices built by a rule that tests/bench/reference_eigh.py repeats bit for bit, so both
/// sides time the same problems. Entry (i, j), 0-based, with i &gt;= j, is 2 u - 1 for
/// u = (splitmix64(seed + (i n + j + 1) * 0x9E3779B97F4A7C15) &gt;&gt; 11) * 2^-53, mirrored above the
/// diagonal: uniform in [-1, 1), a dense random spectrum with no structure to exploit.
/// </summary>
public static class BenchMatrices
{
    private const ulong _golden = 0x9E3779B97F4A7C15;

    /// <summary>The symmetric benchmark matrix of order n.</summary>
    public static DenseMatrix RandomSymmetric(int n, ulong seed = 1)
    {
        var a = new DenseMatrix(n);
        for (var i = 0; i < n; i++)
        {
            for (var j = 0; j <= i; j++)
            {
                var value = 2 * Uniform(seed, (ulong)i * (ulong)n + (ulong)j) - 1;
                a[i, j] = value;
                a[j, i] = value;
            }
        }

        return a;
    }

    /// <summary>The splitmix64 output for counter <paramref name="key"/>, mapped to [0, 1) with 53 bits.</summary>
    private static double Uniform(ulong seed, ulong key)
    {
        var z = unchecked(seed + (key + 1) * _golden);
        z = unchecked((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9);
        z = unchecked((z ^ (z >> 27)) * 0x94D049BB133111EB);
        z ^= z >> 31;
        return (z >> 11) * (1.0 / (1UL << 53));
    }
}
