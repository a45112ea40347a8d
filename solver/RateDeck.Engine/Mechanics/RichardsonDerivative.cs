namespace RateDeck.Mechanics;

/// <summary>
/// dL/dv by Richardson extrapolation of central differences in a Neville tableau, with the step
/// shrinking by 1.4 per row and the row kept whose error estimate is smallest (Ridders,
/// Adv. Eng. Software 4 (1982) 75). The first step should be large (of the order of the scale on
/// which L varies in v): rounding then stays near eps |L| / step, and the extrapolation removes the
/// truncation error. A kinetic term quadratic in v is differentiated to rounding.
/// </summary>
internal static class RichardsonDerivative
{
    private const int _rows = 10;
    private const double _contraction = 1.4;
    private const double _contractionSquared = _contraction * _contraction;
    private const double _safety = 2.0;
    private const int _domainHalvings = 40;

    /// <summary>
    /// dL/dv at (q, v), starting from <paramref name="step"/>, halved until L is finite at v +- 3 step.
    /// A Lagrangian such as -m sqrt(1 - v^2) is defined only for |v| below a limit where it is
    /// singular; keeping the first step below a third of the distance to that edge keeps the
    /// tableau inside the disc where L is analytic, so the extrapolation converges. Returns NaN
    /// when even a step 2^-40 times the first leaves the domain: v is then at or past the edge
    /// (steps below that would round v +- 3 step back onto the edge itself). The error is the
    /// tableau's own estimate: the change between the chosen entry and its neighbours.
    /// </summary>
    public static (double Value, double Error) Velocity(Func<double, double, double> lagrangian, double q, double v, double step)
    {
        var h = step;
        for (var halving = 0; !InsideDomain(lagrangian, q, v, 3 * h); halving++)
        {
            if (halving == _domainHalvings)
            {
                return (double.NaN, double.NaN);
            }

            h *= 0.5;
        }

        var difference = CentralDifference(lagrangian, q, v, h);
        Span<double> previous = stackalloc double[_rows];
        Span<double> current = stackalloc double[_rows];
        previous[0] = difference;
        var best = difference;
        var bestError = double.MaxValue;
        for (var row = 1; row < _rows; row++)
        {
            h /= _contraction;
            current[0] = CentralDifference(lagrangian, q, v, h);
            var factor = _contractionSquared;
            for (var column = 1; column <= row; column++)
            {
                current[column] = (current[column - 1] * factor - previous[column - 1]) / (factor - 1);
                factor *= _contractionSquared;
                var error = Math.Max(
                    Math.Abs(current[column] - current[column - 1]),
                    Math.Abs(current[column] - previous[column - 1]));
                if (error <= bestError)
                {
                    bestError = error;
                    best = current[column];
                }
            }

            // Higher orders have stopped helping: rounding now grows faster than truncation falls.
            if (Math.Abs(current[row] - previous[row - 1]) >= _safety * bestError)
            {
                break;
            }

            var swap = previous;
            previous = current;
            current = swap;
        }

        return (best, bestError == double.MaxValue ? Math.Abs(best) : bestError);
    }

    private static bool InsideDomain(Func<double, double, double> lagrangian, double q, double v, double reach)
        => double.IsFinite(lagrangian(q, v + reach)) && double.IsFinite(lagrangian(q, v - reach));

    private static double CentralDifference(Func<double, double, double> lagrangian, double q, double v, double h)
        => (lagrangian(q, v + h) - lagrangian(q, v - h)) / (2 * h);
}
