using System.Collections.Concurrent;

namespace RateDeck.Mechanics;

/// <summary>
/// Gauss-Legendre nodes and weights on [-1, 1], by Newton's method on the three-term recurrence
/// of the Legendre polynomials from the asymptotic first guess cos(pi (i - 1/4) / (n + 1/2))
/// (Abramowitz and Stegun 25.4.29; common practice). Nodes converge to rounding; rules are cached.
/// </summary>
internal static class GaussLegendre
{
    private const int _maxNewtonSteps = 100;
    private static readonly ConcurrentDictionary<int, (double[] Nodes, double[] Weights)> _rules = new();

    /// <summary>The n-point rule, nodes ascending.</summary>
    public static (double[] Nodes, double[] Weights) Rule(int n) => _rules.GetOrAdd(n, Build);

    private static (double[] Nodes, double[] Weights) Build(int n)
    {
        var nodes = new double[n];
        var weights = new double[n];
        for (var i = 0; i < (n + 1) / 2; i++)
        {
            var x = Math.Cos(Math.PI * (i + 0.75) / (n + 0.5));
            // Newton converges quadratically: once a step is below 1e-15 one more reaches rounding.
            var converged = false;
            for (var step = 0; step < _maxNewtonSteps; step++)
            {
                var (value, slope) = Legendre(n, x);
                var dx = value / slope;
                x -= dx;
                if (converged)
                {
                    break;
                }

                converged = Math.Abs(dx) <= 1e-15;
            }

            var (_, derivative) = Legendre(n, x);
            var weight = 2 / ((1 - x) * (1 + x) * derivative * derivative);
            nodes[n - 1 - i] = x;
            nodes[i] = -x;
            weights[i] = weight;
            weights[n - 1 - i] = weight;
        }

        return (nodes, weights);
    }

    private static (double Value, double Derivative) Legendre(int n, double x)
    {
        double previous = 1, current = x;
        for (var k = 1; k < n; k++)
        {
            (previous, current) = (current, ((2 * k + 1) * x * current - k * previous) / (k + 1));
        }

        return (current, n * (x * current - previous) / ((x - 1) * (x + 1)));
    }
}
