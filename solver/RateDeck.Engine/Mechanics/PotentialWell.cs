namespace RateDeck.Mechanics;

/// <summary>
/// The potential U(q) = -L(q, 0) = h(q, v = 0), the energy of the system at rest at q: the orbit of
/// energy E turns where its velocity vanishes, at the roots of U(q) = E on either side of the
/// well's minimum. When L is even in v (the usual case) the momentum vanishes there too and
/// U(q) = H(q, 0); a term linear in v shifts p but not the turning points, which is why the rest
/// condition v = 0 is used rather than p = 0.
/// </summary>
internal sealed class PotentialWell
{
    private const double _golden = 1.618033988749895;
    private const int _maxExpansions = 1500;
    private const int _maxHalvings = 200;
    private const double _minimumRelativeTolerance = 1e-10;
    private readonly Func<double, double, double> _lagrangian;
    private readonly double _firstStep;

    private PotentialWell(Func<double, double, double> lagrangian, double bottom, double bottomValue, double firstStep)
    {
        _lagrangian = lagrangian;
        Bottom = bottom;
        BottomValue = bottomValue;
        _firstStep = firstStep;
    }

    /// <summary>q at the minimum of U.</summary>
    public double Bottom { get; }

    /// <summary>U at its minimum, the lowest energy of an orbit.</summary>
    public double BottomValue { get; }

    /// <summary>
    /// Finds a minimum of U: a bracket a &lt; b &lt; c with U(b) below both ends, from the starting
    /// interval or by golden-ratio steps downhill from it, then Brent's minimisation to 1e-10
    /// relative (1e-12 of the bracket absolute).
    /// </summary>
    public static PotentialWell Find(Func<double, double, double> lagrangian, double searchLow, double searchHigh)
    {
        double U(double q) => Potential(lagrangian, q);
        double a = searchLow, c = searchHigh, b = 0.5 * (searchLow + searchHigh);
        double fa = U(a), fb = U(b), fc = U(c);
        if (!(fb <= fa && fb <= fc))
        {
            // Walk downhill; the step grows by the golden ratio so a far well is reached in few steps.
            var x1 = b;
            var (x2, f2) = fa < fc ? (a, fa) : (c, fc);
            var bracketed = false;
            for (var step = 0; step < _maxExpansions && !bracketed; step++)
            {
                var x3 = x2 + _golden * (x2 - x1);
                if (!double.IsFinite(x3))
                {
                    break;
                }

                var f3 = U(x3);
                if (f3 > f2)
                {
                    (a, b, c, fb) = (x1, x2, x3, f2);
                    bracketed = true;
                }
                else
                {
                    (x1, x2, f2) = (x2, x3, f3);
                }
            }

            if (!bracketed)
            {
                throw new MechanicsException(FormattableString.Invariant(
                    $"no potential well: U(q) = -L(q, 0) keeps falling from the search interval [{searchLow}, {searchHigh}] out to q = {x2}; give a search interval around the bottom of the well"));
            }
        }

        var (bottom, bottomValue) = ScalarSolvers.Minimize(
            U, a, b, c, fb, _minimumRelativeTolerance, 1e-12 * Math.Abs(c - a));
        return new PotentialWell(lagrangian, bottom, bottomValue, 0.5 * (searchHigh - searchLow));
    }

    /// <summary>U(q) = -L(q, 0); throws <see cref="MechanicsException"/> when L is not a number there.</summary>
    public double U(double q) => Potential(_lagrangian, q);

    /// <summary>
    /// The turning point of energy <paramref name="energy"/> on the high side (<paramref name="side"/> = +1)
    /// or the low side (-1): the first root of U(q) = E going outward from the bottom. The search
    /// steps out from the bottom by doubling distances; where U falls again before reaching E a
    /// barrier lies between the last samples, and its top is found by maximisation: if it is below E
    /// the orbit escapes over it (E is above the separatrix) and a <see cref="MechanicsException"/> says so.
    /// A barrier narrower than the doubling steps can be missed: the well must rise monotonically to
    /// each turning point, and the first step (half the search interval) should be below the well's size.
    /// </summary>
    public double TurningPoint(double energy, int side, int stateIndex)
    {
        var step = _firstStep;

        // The bottom is known to about 1e-8 only: make the first sample rise above it, so that the
        // outward walk cannot start inside a neighbouring, deeper well.
        for (var halving = 0; halving < _maxHalvings && !(U(Bottom + side * step) > BottomValue); halving++)
        {
            step *= 0.5;
        }

        double previous = Bottom, inner = Bottom, innerValue = BottomValue;
        while (true)
        {
            var outer = Bottom + side * step;
            if (!double.IsFinite(outer))
            {
                throw new MechanicsException(
                    FormattableString.Invariant($"the orbit at energy E = {energy} (state {stateIndex + 1}) is not bounded: U(q) = -L(q, 0) stays below E out to q = {inner} on the {SideName(side)} side"),
                    stateIndex);
            }

            var outerValue = U(outer);
            if (outerValue >= energy)
            {
                return Root(inner, outer, energy);
            }

            if (outerValue < innerValue)
            {
                var (top, topValue) = ScalarSolvers.Minimize(
                    q => -U(q), previous, inner, outer, -innerValue, _minimumRelativeTolerance, 1e-12 * step);
                topValue = -topValue;
                if (topValue < energy)
                {
                    throw new MechanicsException(
                        FormattableString.Invariant($"the orbit at energy E = {energy} (state {stateIndex + 1}) is not bounded: it passes over the barrier at q = {top} (U = {topValue}) on the {SideName(side)} side; energies must stay below the separatrix"),
                        stateIndex);
                }

                return Root(side * (top - inner) > 0 ? inner : previous, top, energy);
            }

            (previous, inner, innerValue) = (inner, outer, outerValue);
            step *= 2;
        }
    }

    private double Root(double below, double above, double energy)
    {
        double Residual(double q) => U(q) - energy;
        var root = ScalarSolvers.FindRoot(Residual, below, above, Residual(below), Residual(above), 0);
        return ScalarSolvers.PolishRoot(Residual, root);
    }

    private static string SideName(int side) => side > 0 ? "high" : "low";

    private static double Potential(Func<double, double, double> lagrangian, double q)
    {
        var value = -lagrangian(q, 0);
        return double.IsNaN(value)
            ? throw new MechanicsException(FormattableString.Invariant($"the Lagrangian is not a number at q = {q}, v = 0"))
            : value;
    }
}
