using System.Text.Json;

namespace RateDeck.Tests.Mechanics;

/// <summary>
/// Complete elliptic integrals by the arithmetic-geometric mean, parameter m = k^2
/// (Abramowitz and Stegun, Handbook of Mathematical Functions, 17.6: a0 = 1, b0 = sqrt(1 - m),
/// c0 = sqrt(m); K = pi / (2 a_N) and (K - E) / K = (1/2) sum_n 2^n c_n^2; cited from memory),
/// and the SciPy reference values written by tests/reference/mechanics_elliptic.py.
/// </summary>
internal static class EllipticIntegrals
{
    public static double K(double m) => Agm(m).K;

    public static double E(double m) => Agm(m).E;

    /// <summary>The SciPy fixture: (m, K, E) per case, with the amplitude in degrees where the case has one.</summary>
    public static IReadOnlyList<(double? AmplitudeDegrees, double M, double K, double E)> SciPyCases()
    {
        var path = Path.Combine(AppContext.BaseDirectory, "fixtures", "mechanics", "elliptic-integrals.json");
        using var document = JsonDocument.Parse(File.ReadAllText(path));
        return document.RootElement.GetProperty("cases").EnumerateArray()
            .Select(c => (
                c.TryGetProperty("amplitude_degrees", out var a) ? a.GetDouble() : (double?)null,
                c.GetProperty("m").GetDouble(),
                c.GetProperty("K").GetDouble(),
                c.GetProperty("E").GetDouble()))
            .ToArray();
    }

    private static (double K, double E) Agm(double m)
    {
        double a = 1, b = Math.Sqrt(1 - m), c = Math.Sqrt(m);
        var sum = 0.5 * c * c;
        var power = 0.5;
        // Quadratic convergence: 30 rounds are far more than double precision needs.
        for (var n = 1; n <= 30 && c != 0; n++)
        {
            c = 0.5 * (a - b);
            (a, b) = (0.5 * (a + b), Math.Sqrt(a * b));
            power *= 2;
            sum += power * c * c;
        }

        var k = Math.PI / (2 * a);
        return (k, k * (1 - sum));
    }
}
