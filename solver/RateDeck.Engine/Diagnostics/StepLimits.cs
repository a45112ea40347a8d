using System.Numerics;
using RateDeck.Rates;
using RateDeck.Text;

namespace RateDeck.Diagnostics;

/// <summary>One limit on an explicit time step.</summary>
/// <param name="Name">Short name: "euler-stable", "positivity", "rule-of-thumb" or "rk4-stable".</param>
/// <param name="MaxStep">The largest dt the limit allows (+infinity when K is zero, 0 when no dt is stable).</param>
/// <param name="Steps">ceil(horizon / MaxStep): steps to reach the horizon; null when there is no horizon.</param>
/// <param name="Basis">Where the limit comes from, one line.</param>
public sealed record StepLimit(string Name, double MaxStep, double? Steps, string Basis);

/// <summary>What <see cref="StepLimits.Analyze"/> found.</summary>
/// <param name="SpectralRadius">rho = max |lambda|.</param>
/// <param name="SlowestRate">Decay rate of the slowest decaying mode, or null.</param>
/// <param name="StiffnessRatio">rho / slowest rate, or null.</param>
/// <param name="MaxDiagonalRate">max_i |K_ii|.</param>
/// <param name="EulerStable">Forward-Euler stability limit.</param>
/// <param name="Positivity">Forward-Euler positivity limit.</param>
/// <param name="RuleOfThumb">The rule of thumb dt &lt; 1 / rho.</param>
/// <param name="Rk4Stable">Classical RK4 stability limit.</param>
/// <param name="Horizon">The time the step counts refer to: t_end when given, else 1 / slowest rate; null when neither exists.</param>
/// <param name="HorizonIsEndTime">True when <paramref name="Horizon"/> is the given t_end.</param>
/// <param name="Dt">The step to judge, when given.</param>
/// <param name="EulerSafe">Whether <paramref name="Dt"/> is within the forward-Euler stability limit.</param>
/// <param name="Rk4Safe">Whether <paramref name="Dt"/> is within the RK4 stability limit.</param>
/// <param name="PositivityPreserving">Whether forward Euler with <paramref name="Dt"/> keeps every population non-negative.</param>
/// <param name="Recommendation">One plain line: explicit RK4 or exact propagation, and why.</param>
/// <param name="StepsAtDt">ceil(horizon / dt): explicit steps to the horizon at the given dt; null without a dt or a horizon.</param>
/// <param name="WithinBudget">Whether <paramref name="StepsAtDt"/> is within <see cref="StepLimits.ExplicitStepBudget"/>; null without a count.</param>
public sealed record StiffnessReport(
    double SpectralRadius,
    double? SlowestRate,
    double? StiffnessRatio,
    double MaxDiagonalRate,
    StepLimit EulerStable,
    StepLimit Positivity,
    StepLimit RuleOfThumb,
    StepLimit Rk4Stable,
    double? Horizon,
    bool HorizonIsEndTime,
    double? Dt,
    bool? EulerSafe,
    bool? Rk4Safe,
    bool? PositivityPreserving,
    string Recommendation,
    double? StepsAtDt,
    bool? WithinBudget)
{
    /// <summary>The four limits in a fixed order, for tables.</summary>
    public IReadOnlyList<StepLimit> Limits => [EulerStable, Positivity, RuleOfThumb, Rk4Stable];
}

/// <summary>
/// Limits of explicit time stepping for dP/dt = K P + s (SPEC 2), from the spectrum of K.
/// <para>
/// Forward Euler multiplies mode lambda by 1 + lambda dt and is stable when |1 + lambda dt| &lt;= 1,
/// its stability region being the unit disk centred at -1 (Hairer and Wanner, Solving Ordinary
/// Differential Equations II, sec. IV.2). For each non-zero lambda this means
/// dt &lt;= -2 Re(lambda) / |lambda|^2, which is 2 / rho on a real negative spectrum; on a complex
/// spectrum the exact minimum over lambda is used. Classical RK4 multiplies by
/// R(z) = 1 + z + z^2/2 + z^3/6 + z^4/24, z = lambda dt (same source); on the negative real axis
/// |R| &lt;= 1 down to z = -2.7853 (the real root of R(z) = 1 other than 0); on a complex spectrum
/// each eigenvalue's ray is followed to its first exit from |R| &lt;= 1.
/// </para>
/// <para>
/// Recommendation rule: explicit RK4 costs 4 products of K with a vector, 8 N^2 flops per step;
/// exact propagation costs one eigen-decomposition, about 9 N^3 flops on the symmetric path and
/// 25 N^3 on the general path (Golub and Van Loan, Matrix Computations, operation counts of the
/// symmetric QR and real Schur algorithms with vectors, from memory). RK4 at its stable step (or
/// at the given dt when that is smaller) is recommended when its flops to the horizon are fewer.
/// </para>
/// </summary>
public static class StepLimits
{
    /// <summary>
    /// Most explicit steps a run or a step verdict accepts: 10^7 steps are seconds to minutes on a
    /// small deck, while a stiff deck can ask for 10^15 or more (hours to ages); above it explicit
    /// stepping is declined (run) or refused (stiffness --dt, exit 3) with the count.
    /// </summary>
    public const double ExplicitStepBudget = 1e7;

    /// <summary>Flops of one explicit RK4 step, per N^2.</summary>
    public const double Rk4FlopsPerN2 = 8;

    /// <summary>Flops of the symmetric eigen-decomposition with vectors, per N^3.</summary>
    public const double SymmetricEigenFlopsPerN3 = 9;

    /// <summary>Flops of the general eigen-decomposition with vectors, per N^3.</summary>
    public const double GeneralEigenFlopsPerN3 = 25;

    /// <summary>
    /// |z| of the RK4 stability boundary on the negative real axis, 2.78529356...: R(z) = 1 means
    /// z (1 + z/2 + z^2/6 + z^3/24) = 0, so the boundary is the real root of z^3 + 4 z^2 + 12 z + 24,
    /// found here by bisection on [-3, -2.5] where that cubic changes sign.
    /// </summary>
    public static double Rk4RealAxisLimit { get; } = -Bisect(z => (((((z + 4) * z) + 12) * z) + 24), -3, -2.5);

    /// <summary>Step limits for <paramref name="rates"/>, step counts to <paramref name="endTime"/> (or to 1 / slowest rate), and a verdict on <paramref name="dt"/> when given.</summary>
    public static StiffnessReport Analyze(Spectrum spectrum, RateMatrix rates, double? endTime, double? dt)
    {
        var rho = spectrum.SpectralRadius;
        var slowest = spectrum.SlowestRate;
        var stiffness = slowest is { } s ? rho / s : (double?)null;
        var maxDiagonal = Enumerable.Range(0, rates.Count).Select(i => Math.Abs(rates.Diagonal(i))).DefaultIfEmpty(0).Max();
        var horizon = endTime ?? (slowest is { } rate ? 1 / rate : (double?)null);
        var nonZero = spectrum.Values.Where(v => Complex.Abs(v) > spectrum.ZeroTolerance).ToList();

        var euler = new StepLimit("euler-stable", nonZero.Select(v => Math.Max(0, -2 * v.Real / (v.Real * v.Real + v.Imaginary * v.Imaginary))).DefaultIfEmpty(double.PositiveInfinity).Min(), null,
            spectrum.IsReal ? "2 / rho: |1 + lambda dt| <= 1 on a real negative spectrum" : "exact forward-Euler limit min over lambda of -2 Re(lambda) / |lambda|^2 (complex spectrum)");
        var positivity = new StepLimit("positivity", 1 / maxDiagonal, null, "1 / max|K_ii|: I + dt K has no negative entry (common practice)");
        var thumb = new StepLimit("rule-of-thumb", 1 / rho, null, "1 / rho (common practice)");
        var rk4 = spectrum.IsReal
            ? new StepLimit("rk4-stable", Rk4RealAxisLimit / rho, null, $"{Format.Number(Rk4RealAxisLimit)} / rho: RK4 stability boundary on the negative real axis")
            : new StepLimit("rk4-stable", nonZero.Where(v => v.Imaginary >= 0).Select(v => Rk4RayLimit(v / Complex.Abs(v)) / Complex.Abs(v)).DefaultIfEmpty(double.PositiveInfinity).Min(), null,
                "first exit of each eigenvalue's ray from |R(lambda dt)| <= 1 (complex spectrum)");
        StepLimit Counted(StepLimit limit) => limit with { Steps = horizon is { } h ? Math.Ceiling(h / limit.MaxStep) : null };
        (euler, positivity, thumb, rk4) = (Counted(euler), Counted(positivity), Counted(thumb), Counted(rk4));

        bool? Within(StepLimit limit) => dt is { } step ? step <= limit.MaxStep : null;
        var recommendation = Recommend(spectrum, rates.Count, rates.TimeUnit, rk4, horizon, endTime is not null, stiffness, dt);
        var stepsAtDt = dt is { } given && horizon is { } end ? Math.Ceiling(end / given) : (double?)null;
        return new StiffnessReport(rho, slowest, stiffness, maxDiagonal, euler, positivity, thumb, rk4, horizon, endTime is not null,
            dt, Within(euler), Within(rk4), Within(positivity), recommendation, stepsAtDt, stepsAtDt is { } count ? count <= ExplicitStepBudget : null);
    }

    /// <summary>R(z) of classical RK4.</summary>
    internal static Complex Rk4Amplification(Complex z) => 1 + (z * (1 + (z * (0.5 + (z * ((1.0 / 6) + (z / 24)))))));

    private static string Recommend(Spectrum spectrum, int n, string unit, StepLimit rk4, double? horizon, bool horizonIsEnd, double? stiffness, double? dt)
    {
        if (spectrum.SpectralRadius == 0)
        {
            return "K is zero: the populations only follow the pumping, any step is exact";
        }

        if (horizon is not { } t)
        {
            return "no mode decays and no t_end was given: give t_end to count the steps";
        }

        var unsafeDt = dt > rk4.MaxStep;
        var step = dt is { } given && !unsafeDt ? Math.Min(given, rk4.MaxStep) : rk4.MaxStep;
        var steps = Math.Ceiling(t / step);
        var exactFlops = (spectrum.Path == SpectrumPath.Symmetrized ? SymmetricEigenFlopsPerN3 : GeneralEigenFlopsPerN3) * n;
        var explicitCheaper = steps * Rk4FlopsPerN2 < exactFlops;
        var prefix = unsafeDt ? $"dt = {Format.Time(dt!.Value, unit)} is unstable for RK4 (limit {Format.Time(rk4.MaxStep, unit)}); " : "";
        var target = horizonIsEnd ? $"t_end = {Format.Time(t, unit)}" : $"t = 1/slowest rate = {Format.Time(t, unit)}";
        var verdict = steps > ExplicitStepBudget
            ? $"above the budget of {Format.Number(ExplicitStepBudget)} explicit steps, so use exact propagation (run takes it and declines the explicit method)"
            : explicitCheaper ? "cheaper than exact propagation" : "exact propagation is cheaper";
        var ratio = stiffness is { } r ? $"stiffness ratio {Format.Number(r)}" : spectrum.IsResolved ? "no decaying mode" : "slow modes not resolved in double precision";
        return $"{prefix}explicit RK4 with dt <= {Format.Time(step, unit)} needs {Format.Count(steps)} steps to {target}; {verdict} ({ratio})";
    }

    /// <summary>Largest r with |R(r d)| &lt;= 1 on [0, r] for the unit direction d: a scan in steps of 1e-3 up to |z| = 4 (the region lies inside), then bisection.</summary>
    private static double Rk4RayLimit(Complex direction)
    {
        const double scanStep = 1e-3;
        for (var r = scanStep; r <= 4; r += scanStep)
        {
            if (Complex.Abs(Rk4Amplification(r * direction)) > 1)
            {
                return Bisect(x => 1 - Complex.Abs(Rk4Amplification(x * direction)), r - scanStep, r);
            }
        }

        return 4;
    }

    /// <summary>Root of <paramref name="f"/> in [a, b] by bisection to adjacent doubles; f(a) and f(b) of opposite sign or f(a) = 0.</summary>
    private static double Bisect(Func<double, double> f, double a, double b)
    {
        var fa = f(a);
        for (var iteration = 0; iteration < 200; iteration++)
        {
            var mid = 0.5 * (a + b);
            if (mid <= a || mid >= b)
            {
                break;
            }

            var fm = f(mid);
            if (Math.Sign(fm) == Math.Sign(fa) && fm != 0)
            {
                (a, fa) = (mid, fm);
            }
            else
            {
                b = mid;
            }
        }

        return a;
    }
}
