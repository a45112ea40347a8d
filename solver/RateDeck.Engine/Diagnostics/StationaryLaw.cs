using RateDeck.Rates;

namespace RateDeck.Diagnostics;

/// <summary>
/// The stationary law of one closed class by the Grassmann-Taksar-Heyman elimination (Grassmann,
/// Taksar and Heyman, Oper. Res. 33 (1985) 1107): states are censored one at a time from the last,
/// each time dividing the censored state's rates by its total outflow to the states kept, which is
/// summed from the off-diagonal rates rather than read from the diagonal, and adding the paths
/// through it to the rates among the states kept. Nothing is ever subtracted, so each probability
/// comes out with a relative error of a few units of roundoff times a low power of the class size,
/// however stiff the rates (O'Cinneide, Numer. Math. 65 (1993) 109, from memory). O(n^3) for a
/// class of n states.
/// </summary>
public static class StationaryLaw
{
    /// <summary>
    /// The stationary law of K on the closed class <paramref name="states"/>, in their order, summing
    /// to 1. Rates leaving the class are ignored (a closed class has none).
    /// </summary>
    /// <exception cref="ArgumentException">A state censored has no rate to the states kept: the states do not form one closed class.</exception>
    public static double[] OfClass(RateMatrix rates, IReadOnlyList<int> states)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(states);
        var n = states.Count;
        var k = rates.Generator;

        // q[a, b] (row-major): the rate from the a-th state of the class to the b-th.
        var q = new double[n * n];
        for (var a = 0; a < n; a++)
        {
            for (var b = 0; b < n; b++)
            {
                q[(a * n) + b] = a == b ? 0.0 : k[states[b], states[a]];
            }
        }

        return Solve(q, n);
    }

    /// <summary>GTH on the row-major rate array <paramref name="q"/> (consumed): the normalised stationary vector.</summary>
    internal static double[] Solve(double[] q, int n)
    {
        for (var c = n - 1; c > 0; c--)
        {
            var outflow = 0.0;
            for (var b = 0; b < c; b++)
            {
                outflow += q[(c * n) + b];
            }

            if (!(outflow > 0))
            {
                throw new ArgumentException($"state {c + 1} of the class has no rate to the states kept, so the states are not one closed class");
            }

            for (var a = 0; a < c; a++)
            {
                var through = q[(a * n) + c] / outflow;
                q[(a * n) + c] = through;
                if (through == 0)
                {
                    continue;
                }

                for (var b = 0; b < c; b++)
                {
                    if (b != a)
                    {
                        q[(a * n) + b] += through * q[(c * n) + b];
                    }
                }
            }
        }

        var law = new double[n];
        law[0] = 1.0;
        for (var b = 1; b < n; b++)
        {
            var sum = 0.0;
            for (var a = 0; a < b; a++)
            {
                sum += law[a] * q[(a * n) + b];
            }

            law[b] = sum;
        }

        var total = law.Sum();
        for (var b = 0; b < n; b++)
        {
            law[b] /= total;
        }

        return law;
    }
}
