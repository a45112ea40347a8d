namespace RateDeck.Mechanics;

/// <summary>
/// The action J = closed-orbit integral of p dq and the period T = closed-orbit integral of dq / v
/// for one energy, on both branches of the orbit (v &gt; 0 outward, v &lt; 0 back), so no symmetry of
/// L in v is assumed: J = integral of (p+ - p-) dq and T = integral of (1/v+ + 1/|v-|) dq over
/// [q-, q+]. The interval is split at the bottom of the well, where a potential such as c |q|^n
/// has its kink. On each side, q = q_t - 2 w sin^2(phi / 2) with w = q_t - q_bottom maps phi in
/// [0, pi/2] to [q_t, q_bottom]; dq = -w sin(phi) dphi cancels the square-root zero of v at the
/// turning point q_t, so both integrands are smooth in phi, and even about phi = 0. Gauss-Legendre
/// rules on [-pi/2, pi/2] (only their positive nodes are needed) then converge geometrically,
/// algebraically only at a non-analytic bottom. Rules of 32, 64, 128, ... nodes are tried until J
/// and T change by less than the relative tolerance, or by less than their rounding floor.
/// </summary>
/// <remarks>
/// The rounding floor: each value of L carries an error of about eps |L|, so the residual
/// h(q, v) - E is known to e = 4 eps max(|E|, |U(q)|) + |v| dp, dp the extrapolation's error
/// estimate for p. Since dp/dE = 1/v at fixed q, and d(1/v)/dE = -1 / (v^3 d2L/dv2), close to
/// -1 / (2 v (E - U)), the sums of jacobian (e / |v| + dp) and jacobian e / (2 |v| (E - U)) estimate
/// the rounding error of J and T. The estimate grows with the number of nodes near the turning
/// points, and is large when L holds a big constant (|E| much larger than the depth of the well)
/// or the orbit is near a separatrix.
/// </remarks>
internal static class OrbitQuadrature
{
    private const int _firstRule = 32;
    private const int _maxSteps = 2100;
    private const double _rounding = 4 * 2.220446049250313e-16;

    /// <summary>
    /// J, T and the estimated relative error of both for the orbit of <paramref name="energy"/>
    /// with turning points <paramref name="low"/> and <paramref name="high"/>.
    /// </summary>
    public static (double Action, double Period, double RelativeError) Integrate(
        Func<double, double, double> lagrangian, PotentialWell well, double energy, double low, double high,
        MechanicsOptions options, int stateIndex)
    {
        var orbit = new Orbit(lagrangian, energy, stateIndex);
        var scale = options.VelocityScale ?? orbit.BottomSpeed(well.Bottom);
        orbit.UseVelocityScale(scale);
        var lowSide = orbit.Side(low, well.Bottom, scale, options);
        var highSide = orbit.Side(high, well.Bottom, scale, options);
        var action = lowSide.Action + highSide.Action;
        var period = lowSide.Period + highSide.Period;
        var error = Math.Max(
            (lowSide.ActionError + highSide.ActionError) / Math.Abs(action),
            (lowSide.PeriodError + highSide.PeriodError) / Math.Abs(period));
        if (error > options.MaxRelativeError)
        {
            throw new MechanicsException(
                FormattableString.Invariant($"at energy E = {energy} (state {stateIndex + 1}) the action and period are only good to {error:E1} relative (limit {options.MaxRelativeError:E1}): rounding in L near the turning points limits them; measure energies from the bottom of the well (add a constant to L) or keep clear of the separatrix"),
                stateIndex);
        }

        return (action, period, error);
    }

    /// <summary>Sums over one side of the orbit, with absolute error estimates.</summary>
    private readonly record struct SideSums(double Action, double Period, double ActionError, double PeriodError);

    private sealed class Orbit(Func<double, double, double> lagrangian, double energy, int stateIndex)
    {
        private LegendreTransform _transform = new(lagrangian);

        /// <summary>The largest |v| at the bottom of the well, found with the default step scale (v is never 0 in that search).</summary>
        public double BottomSpeed(double bottom)
        {
            var depth = energy + lagrangian(bottom, 0);
            return Math.Max(Speed(bottom, depth, 1, 1), -Speed(bottom, depth, -1, 1));
        }

        public void UseVelocityScale(double scale) => _transform = new LegendreTransform(lagrangian, scale);

        /// <summary>
        /// J and T of [turning, bottom]. The error of a rule is taken as its change from the rule of
        /// half the size, or its rounding bound when that is larger; it is accepted once it is
        /// within the tolerance, or once the change is below the rounding bound (more nodes only add rounding).
        /// </summary>
        public SideSums Side(double turning, double bottom, double scale, MechanicsOptions options)
        {
            var width = turning - bottom;
            if (width == 0)
            {
                return default;
            }

            var coarse = Rule(_firstRule, turning, width, scale);
            for (var n = 2 * _firstRule; n <= options.MaxNodes; n *= 2)
            {
                var fine = Rule(n, turning, width, scale);
                var actionChange = Math.Abs(fine.Action - coarse.Action);
                var periodChange = Math.Abs(fine.Period - coarse.Period);
                var withinTolerance = actionChange <= options.RelativeTolerance * Math.Abs(fine.Action)
                    && periodChange <= options.RelativeTolerance * Math.Abs(fine.Period);
                var atRoundingFloor = actionChange <= fine.ActionError && periodChange <= fine.PeriodError;
                if (withinTolerance || atRoundingFloor)
                {
                    return fine with
                    {
                        ActionError = Math.Max(actionChange, fine.ActionError),
                        PeriodError = Math.Max(periodChange, fine.PeriodError),
                    };
                }

                coarse = fine;
            }

            throw new MechanicsException(
                FormattableString.Invariant($"the action and period at energy E = {energy} (state {stateIndex + 1}) did not converge with {options.MaxNodes} quadrature nodes per side; the energy may be too close to a separatrix (raise the node limit or the tolerance)"),
                stateIndex);
        }

        /// <summary>
        /// The n-node rule. The integrand is even in phi about the turning point (phi = 0), so the
        /// rule on [-pi/2, pi/2] needs only its positive nodes; unlike a rule on [0, pi/2] it does not
        /// crowd nodes against the turning point, where E - U(q) is small and loses digits to rounding.
        /// </summary>
        private SideSums Rule(int n, double turning, double width, double scale)
        {
            var (nodes, weights) = GaussLegendre.Rule(n);
            double action = 0, period = 0, actionError = 0, periodError = 0;
            double forwardGuess = scale, backwardGuess = -scale;
            for (var i = n / 2; i < n; i++)
            {
                var phi = 0.5 * Math.PI * nodes[i];
                var half = Math.Sin(0.5 * phi);
                var q = turning - 2 * width * half * half;
                var jacobian = 0.5 * Math.PI * weights[i] * Math.Abs(width) * Math.Sin(phi);
                var potential = -lagrangian(q, 0);
                var depth = energy - potential;
                var forward = Speed(q, depth, 1, forwardGuess);
                var backward = Speed(q, depth, -1, backwardGuess);
                var (forwardMomentum, forwardMomentumError) = _transform.MomentumWithError(q, forward);
                var (backwardMomentum, backwardMomentumError) = _transform.MomentumWithError(q, backward);
                action += jacobian * (forwardMomentum - backwardMomentum);
                period += jacobian * (1 / forward - 1 / backward);

                // The residual h - E is off by the rounding of L plus |v| times the error of p; the
                // momentum error that induces is that over |v| (dp/dE = 1/v at fixed q).
                var rounding = _rounding * Math.Max(Math.Abs(energy), Math.Abs(potential));
                var forwardInduced = (rounding + forward * forwardMomentumError) / forward;
                var backwardInduced = (rounding - backward * backwardMomentumError) / -backward;
                actionError += jacobian * (forwardInduced + forwardMomentumError + backwardInduced + backwardMomentumError);
                periodError += jacobian * (forwardInduced + backwardInduced) / (2 * depth);
                (forwardGuess, backwardGuess) = (forward, backward);
            }

            if (!double.IsFinite(action) || !double.IsFinite(period))
            {
                throw new MechanicsException(
                    FormattableString.Invariant($"the period integral at energy E = {energy} (state {stateIndex + 1}) is not finite: the energy is at or too near a separatrix"),
                    stateIndex);
            }

            return new SideSums(action, period, actionError, periodError);
        }

        /// <summary>
        /// The velocity of sign <paramref name="direction"/> with h(q, v) = E at a point q where
        /// E - U(q) = <paramref name="depth"/> &gt; 0: a bracket by doubling or halving from
        /// <paramref name="guess"/>, then Brent's method to rounding. h grows with |v| when L is
        /// convex in v; where L is not finite (past a velocity limit) h counts as above E.
        /// </summary>
        private double Speed(double q, double depth, int direction, double guess)
        {
            if (!(depth > 0))
            {
                // U(q) and E agree to rounding at a node next to a turning point: the velocity there is lost.
                throw new MechanicsException(
                    FormattableString.Invariant($"at energy E = {energy} (state {stateIndex + 1}) the orbit cannot be resolved next to its turning point (at q = {q} the potential -L(q, 0) equals E to rounding); measure energies from the bottom of the well (add a constant to L) or loosen the tolerance"),
                    stateIndex);
            }

            double Residual(double v)
            {
                var r = _transform.EnergyFunction(q, v) - energy;
                return double.IsNaN(r) ? double.PositiveInfinity : r;
            }

            var v = direction * (guess != 0 && double.IsFinite(guess) ? Math.Abs(guess) : _transform.VelocityScale);
            var r = Residual(v);
            double previous = v, previousResidual = r;
            var rising = r < 0;
            for (var step = 0; (r < 0) == rising; step++)
            {
                (previous, previousResidual) = (v, r);
                v *= rising ? 2 : 0.5;
                // Halving ends (h tends to U(q) < E as v goes to 0); doubling ends unless h is bounded
                // in v, as when L does not depend on v or is not convex in it: v then overflows.
                if (step == _maxSteps || !double.IsFinite(v))
                {
                    throw new MechanicsException(
                        FormattableString.Invariant($"at energy E = {energy} (state {stateIndex + 1}) no velocity reaches the energy at q = {q}: v dL/dv - L must grow without bound in |v| (L must depend on v and be convex in it, like 0.5*m*v^2 - U(q))"),
                        stateIndex);
                }

                r = Residual(v);
            }

            return ScalarSolvers.FindRoot(Residual, previous, v, previousResidual, r, 0);
        }
    }
}
