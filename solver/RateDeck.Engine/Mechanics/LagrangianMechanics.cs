namespace RateDeck.Mechanics;

/// <summary>
/// Actions, periods and semiclassical weights of the states of a one-degree-of-freedom model given
/// by its Lagrangian L(q, v) (SPEC 3). For each energy E: the turning points q_-(E) &lt; q_+(E) where the
/// orbit comes to rest (roots of U(q) = -L(q, 0) = E around the bottom of the well), the action
/// J(E) = closed-orbit integral of p dq with p = dL/dv on the orbit H = E, the period
/// T(E) = dJ/dE = closed-orbit integral of dq / v, and the weight g(E) = T(E) / h.
/// </summary>
/// <remarks>
/// Accuracy (measured, docs/mechanics.md): J and T to 1e-14 relative on the oscillator, power-law
/// wells and a pendulum away from its separatrix, 1e-12 one degree below it and 3e-11 at a tenth of
/// a degree; each state carries an error estimate. Rounding limits the accuracy when L holds a
/// constant much larger than the depth of the well. L must be convex in v; energies are values of
/// the Hamiltonian itself (a constant added to L shifts them).
/// </remarks>
public static class LagrangianMechanics
{
    /// <summary>
    /// Derives J, T, g and the turning points for each of <paramref name="energies"/>, with
    /// <paramref name="planck"/> = h in the deck's units. Throws <see cref="MechanicsException"/>
    /// (plain message, state index where one is at fault) when there is no well, an energy is below
    /// its bottom or above a separatrix, or an integral does not converge.
    /// </summary>
    public static MechanicsResult Derive(
        Func<double, double, double> lagrangian, IReadOnlyList<double> energies, double planck, MechanicsOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(lagrangian);
        ArgumentNullException.ThrowIfNull(energies);
        options ??= new MechanicsOptions();
        Validate(options, planck);

        var well = PotentialWell.Find(lagrangian, options.SearchLow, options.SearchHigh);
        var count = energies.Count;
        var result = new MechanicsResult(
            new double[count], new double[count], new double[count], new double[count], new double[count], new double[count]);
        for (var i = 0; i < count; i++)
        {
            var energy = energies[i];
            if (!double.IsFinite(energy))
            {
                throw new MechanicsException(FormattableString.Invariant($"the energy of state {i + 1} is {energy}; give a finite number"), i);
            }

            if (!(energy > well.BottomValue))
            {
                throw new MechanicsException(
                    FormattableString.Invariant($"the energy E = {energy} of state {i + 1} is not above the bottom of the well (U = {well.BottomValue} at q = {well.Bottom}); an orbit needs E > U there"),
                    i);
            }

            var low = well.TurningPoint(energy, -1, i);
            var high = well.TurningPoint(energy, 1, i);
            var (action, period, error) = OrbitQuadrature.Integrate(lagrangian, well, energy, low, high, options, i);
            result.Actions[i] = action;
            result.Periods[i] = period;
            result.Weights[i] = period / planck;
            result.TurningPointsLow[i] = low;
            result.TurningPointsHigh[i] = high;
            result.RelativeErrors[i] = error;
        }

        return result;
    }

    private static void Validate(MechanicsOptions options, double planck)
    {
        if (!(planck > 0) || !double.IsFinite(planck))
        {
            throw new MechanicsException(FormattableString.Invariant($"Planck's constant h must be positive and finite, not {planck}"));
        }

        if (!double.IsFinite(options.SearchLow) || !double.IsFinite(options.SearchHigh) || !(options.SearchLow < options.SearchHigh))
        {
            throw new MechanicsException(FormattableString.Invariant(
                $"the search interval [{options.SearchLow}, {options.SearchHigh}] must be finite with its low end below its high end"));
        }

        if (options.VelocityScale is { } scale && (!(scale > 0) || !double.IsFinite(scale)))
        {
            throw new MechanicsException(FormattableString.Invariant($"the velocity scale must be positive and finite, not {scale}"));
        }

        if (!(options.RelativeTolerance > 0) || options.RelativeTolerance >= 1)
        {
            throw new MechanicsException(FormattableString.Invariant($"the relative tolerance must lie in (0, 1), not {options.RelativeTolerance}"));
        }

        if (!(options.MaxRelativeError >= options.RelativeTolerance) || options.MaxRelativeError >= 1)
        {
            throw new MechanicsException(FormattableString.Invariant(
                $"the largest accepted error must lie between the relative tolerance and 1, not {options.MaxRelativeError}"));
        }

        if (options.MaxNodes < 64)
        {
            throw new MechanicsException(FormattableString.Invariant($"the node limit must be at least 64, not {options.MaxNodes}"));
        }
    }
}
