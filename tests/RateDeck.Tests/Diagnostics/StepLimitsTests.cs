using System.Numerics;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using Xunit;

namespace RateDeck.Tests.Diagnostics;

/// <summary>
/// Stability limits of explicit steps. Forward Euler's stability region is the disk |1 + z| &lt;= 1
/// and classical RK4's is |R(z)| &lt;= 1 with R(z) = 1 + z + z^2/2 + z^3/6 + z^4/24 (Hairer and
/// Wanner, Solving Ordinary Differential Equations II, sec. IV.2). The stepping loops are written
/// here, independent of the propagators.
/// </summary>
public class StepLimitsTests
{
    private const int _steps = 10_000;
    private static readonly ILinearAlgebra _algebra = new ManagedLinearAlgebra();

    private static double[] EulerStep(RateMatrix rates, double[] p, double dt) =>
        [.. TestMatrices.Apply(rates, p).Select((kp, i) => p[i] + (dt * kp))];

    private static double[] Rk4Step(RateMatrix rates, double[] p, double dt)
    {
        double[] Shift(double[] k, double h) => [.. p.Select((x, i) => x + (h * k[i]))];
        var k1 = TestMatrices.Apply(rates, p);
        var k2 = TestMatrices.Apply(rates, Shift(k1, dt / 2));
        var k3 = TestMatrices.Apply(rates, Shift(k2, dt / 2));
        var k4 = TestMatrices.Apply(rates, Shift(k3, dt));
        return [.. p.Select((x, i) => x + (dt / 6 * (k1[i] + (2 * k2[i]) + (2 * k3[i]) + k4[i])))];
    }

    /// <summary>
    /// Largest D^(-1/2)-weighted 2-norm over the run, relative to the start. Under detailed balance
    /// D^(-1/2) K D^(1/2) is symmetric, so a stable step cannot increase this norm.
    /// </summary>
    private static double Growth(RateMatrix rates, Func<RateMatrix, double[], double, double[]> step, double dt)
    {
        var logPi = rates.States.LogEquilibrium;
        double Norm(double[] p) => Math.Sqrt(p.Select((x, i) => x * x * Math.Exp(-logPi[i])).Sum());
        var p = new double[rates.Count];
        p[0] = 1; // a corner start excites every mode
        var start = Norm(p);
        var largest = 0.0;
        for (var n = 0; n < _steps; n++)
        {
            p = step(rates, p, dt);
            largest = Math.Max(largest, Norm(p) / start);
        }

        return largest;
    }

    public static TheoryData<string> Matrices => ["random-walk", "balanced4"];

    private static RateMatrix Named(string name) => name == "random-walk" ? TestMatrices.RandomWalk(20, 1.3) : TestMatrices.FromFixture("balanced4");

    [Theory]
    [MemberData(nameof(Matrices))]
    public void ForwardEuler_IsBoundedJustBelowTwoOverRho_AndGrowsJustAbove(string name)
    {
        var rates = Named(name);
        var report = StepLimits.Analyze(Spectrum.Compute(rates, _algebra), rates, null, null);

        Assert.Equal(2 / report.SpectralRadius, report.EulerStable.MaxStep, 1e-12);
        Assert.True(Growth(rates, EulerStep, 0.99 * report.EulerStable.MaxStep) <= 1 + 1e-12);
        Assert.True(Growth(rates, EulerStep, 1.01 * report.EulerStable.MaxStep) > 1e6);
    }

    [Theory]
    [MemberData(nameof(Matrices))]
    public void Rk4_IsBoundedJustBelowItsRealAxisLimit_AndGrowsJustAbove(string name)
    {
        var rates = Named(name);
        var report = StepLimits.Analyze(Spectrum.Compute(rates, _algebra), rates, null, null);

        Assert.Equal(StepLimits.Rk4RealAxisLimit / report.SpectralRadius, report.Rk4Stable.MaxStep, 1e-12);
        Assert.True(Growth(rates, Rk4Step, 0.99 * report.Rk4Stable.MaxStep) <= 1 + 1e-12);
        Assert.True(Growth(rates, Rk4Step, 1.01 * report.Rk4Stable.MaxStep) > 1e6);
    }

    [Fact]
    public void ForwardEuler_KeepsPopulationsNonNegative_BelowOneOverMaxDiagonal()
    {
        // I + dt K has no negative entry when dt max|K_ii| <= 1 (common practice); above, the
        // state with the largest outflow is overdrawn in the very first step.
        var rates = TestMatrices.FromFixture("balanced4");
        var report = StepLimits.Analyze(Spectrum.Compute(rates, _algebra), rates, null, null);
        var fastest = Enumerable.Range(0, rates.Count).MaxBy(i => Math.Abs(rates.Generator[i, i]));
        Assert.Equal(1 / Math.Abs(rates.Generator[fastest, fastest]), report.Positivity.MaxStep, 1e-15);

        for (var start = 0; start < rates.Count; start++)
        {
            var p = new double[rates.Count];
            p[start] = 1;
            for (var n = 0; n < 1000; n++)
            {
                p = EulerStep(rates, p, 0.999 * report.Positivity.MaxStep);
                Assert.All(p, x => Assert.True(x >= 0));
            }
        }

        var overdrawn = new double[rates.Count];
        overdrawn[fastest] = 1;
        Assert.True(EulerStep(rates, overdrawn, 1.01 * report.Positivity.MaxStep)[fastest] < 0);
    }

    [Fact]
    public void ComplexSpectrum_UsesTheExactEulerAndRk4Limits()
    {
        // The circulant ring is a normal matrix, so the plain 2-norm decides stability. Its exact
        // Euler limit min -2 Re(lambda)/|lambda|^2 = 7.5 / 15.75 (by hand, lambda = -3.75 +- 1.299i) lies
        // below 2 / rho: a step between them, which a real-axis rule would allow, grows.
        var rates = TestMatrices.FromFixture("cyclic3");
        var spectrum = Spectrum.Compute(rates, _algebra);
        var report = StepLimits.Analyze(spectrum, rates, null, null);

        Assert.Equal(7.5 / 15.75, report.EulerStable.MaxStep, 1e-12);
        Assert.True(report.EulerStable.MaxStep < 2 / spectrum.SpectralRadius);
        Assert.True(Growth(rates, EulerStep, 0.99 * report.EulerStable.MaxStep) <= 1 + 1e-12);
        Assert.True(Growth(rates, EulerStep, 1.01 * report.EulerStable.MaxStep) > 1e6);
        Assert.True(Growth(rates, Rk4Step, 0.99 * report.Rk4Stable.MaxStep) <= 1 + 1e-12);
        Assert.True(Growth(rates, Rk4Step, 1.01 * report.Rk4Stable.MaxStep) > 1e6);
    }

    [Fact]
    public void Rk4RealAxisLimit_IsTheRealRootOfTheStabilityPolynomial()
    {
        // R(z) = 1 means z (1 + z/2 + z^2/6 + z^3/24) = 0; MathNet's companion-matrix roots of the cubic,
        // NumPy's numpy.roots (fixture) and the 2.785 quoted in SPEC 2 must all agree.
        var roots = MathNet.Numerics.FindRoots.Polynomial([1.0, 0.5, 1.0 / 6, 1.0 / 24]);
        var realRoot = roots.Where(r => Math.Abs(r.Imaginary) < 1e-12).Single().Real;

        Assert.Equal(-realRoot, StepLimits.Rk4RealAxisLimit, 1e-12);
        Assert.Equal(-TestMatrices.Fixture.GetProperty("rk4_real_axis_root").GetDouble(), StepLimits.Rk4RealAxisLimit, 1e-12);
        Assert.Equal(2.785, StepLimits.Rk4RealAxisLimit, 1e-3);
        Assert.Equal(1.0, Complex.Abs(StepLimits.Rk4Amplification(-StepLimits.Rk4RealAxisLimit)), 1e-12);
    }

    [Fact]
    public void RandomWalk_ReportsAnalyticLimitsStepCountsAndVerdicts()
    {
        // Path-graph spectrum (Strang, SIAM Review 41 (1999) 135): rho = 2 r (1 - cos((n-1) pi / n)),
        // slowest rate 2 r (1 - cos(pi / n)).
        const int n = 20;
        const double r = 1.3;
        const double endTime = 50;
        var rho = 2 * r * (1 - Math.Cos((n - 1) * Math.PI / n));
        var slowest = 2 * r * (1 - Math.Cos(Math.PI / n));
        var rates = TestMatrices.RandomWalk(n, r);
        var dt = 0.5 * ((1 / (2 * r)) + (2 / rho)); // between the positivity limit 1/(2r) and 2/rho, which is slightly larger

        var report = StepLimits.Analyze(Spectrum.Compute(rates, _algebra), rates, endTime, dt);

        Assert.Equal(rho, report.SpectralRadius, 1e-12);
        Assert.Equal(slowest, report.SlowestRate!.Value, 1e-12);
        Assert.Equal(rho / slowest, report.StiffnessRatio!.Value, 1e-9);
        Assert.Equal(1 / rho, report.RuleOfThumb.MaxStep, 1e-12);
        Assert.Equal(1 / (2 * r), report.Positivity.MaxStep, 1e-15);
        Assert.Equal(Math.Ceiling(endTime / report.EulerStable.MaxStep), report.EulerStable.Steps);
        Assert.Equal(Math.Ceiling(endTime / report.Rk4Stable.MaxStep), report.Rk4Stable.Steps);
        Assert.True(report.EulerSafe);
        Assert.True(report.Rk4Safe);
        Assert.False(report.PositivityPreserving);
    }

    [Fact]
    public void Recommendation_FollowsTheStatedCostRule()
    {
        // Stiff: rates 1e4 and 1e-2 in one chain give a stiffness ratio near 1e6; with N = 3 the
        // explicit run (8 N^2 flops a step) cannot beat one 9 N^3 eigen-decomposition.
        var stiffRates = new double[3, 3];
        stiffRates[1, 0] = stiffRates[0, 1] = 1e4;
        stiffRates[2, 1] = stiffRates[1, 2] = 1e-2;
        var stiff = TestMatrices.FromRates(stiffRates, origin: BalanceOrigin.CompletedByDetailedBalance);
        var stiffReport = StepLimits.Analyze(Spectrum.Compute(stiff, _algebra), stiff, 1000, null);
        Assert.StartsWith("explicit RK4 with dt <= ", stiffReport.Recommendation);
        Assert.Contains("exact propagation is cheaper", stiffReport.Recommendation);
        Assert.Contains("to t_end = 1000", stiffReport.Recommendation);

        // Mild and short: 200 states, horizon a few fast times: RK4 needs fewer than 9 N / 8 = 225 steps.
        var mild = TestMatrices.RandomWalk(200, 1.0);
        var mildReport = StepLimits.Analyze(Spectrum.Compute(mild, _algebra), mild, 10, null);
        Assert.True(mildReport.Rk4Stable.Steps < StepLimits.SymmetricEigenFlopsPerN3 * 200 / StepLimits.Rk4FlopsPerN2);
        Assert.Contains("cheaper than exact propagation", mildReport.Recommendation);

        // An unstable dt is named first.
        var unsafeReport = StepLimits.Analyze(Spectrum.Compute(mild, _algebra), mild, 10, 1.0);
        Assert.False(unsafeReport.Rk4Safe);
        Assert.StartsWith("dt = 1 is unstable for RK4", unsafeReport.Recommendation);
    }
}
