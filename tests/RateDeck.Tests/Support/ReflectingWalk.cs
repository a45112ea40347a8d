namespace RateDeck.Tests.Support;

/// <summary>
/// The reflecting random walk on N states with hop rate r between neighbours, solved exactly:
/// eigenvalues -2r(1 - cos(pi k / N)), eigenvectors v_k(i) = cos(pi k (i + 1/2) / N) with
/// |v_0|^2 = N and |v_k|^2 = N / 2 (the DCT-II basis; G. Strang, "The discrete cosine transform",
/// SIAM Review 41 (1999) 135).
/// </summary>
internal static class ReflectingWalk
{
    /// <summary>P_state(t) for all population starting in <paramref name="start"/> (zero-based states).</summary>
    public static double Population(int n, double rate, int start, int state, double time)
    {
        var population = 0.0;
        for (var k = 0; k < n; k++)
        {
            var lambda = -2 * rate * (1 - Math.Cos(Math.PI * k / n));
            var norm = k == 0 ? n : n / 2.0;
            population += Math.Exp(lambda * time) * Cosine(k, state, n) * Cosine(k, start, n) / norm;
        }

        return population;
    }

    private static double Cosine(int k, int i, int n) => Math.Cos(Math.PI * k * (i + 0.5) / n);
}
