using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.Rates;
using Xunit;

namespace RateDeck.Tests.Propagation;

public class ExplicitMethodTests
{
    /// <summary>A driven, lossy three-state generator with detailed balance (rho about 2.5).</summary>
    private static RateMatrix DrivenThreeState() => TestRates.Completed(
        [0.0, -0.5, -1.2],
        (i, j) => (i, j) switch { (0, 1) => 1.0, (1, 2) => 0.6, _ => 0.2 },
        loss: [0, 0, 0.1],
        pumping: [0.3, 0, 0]);

    [Theory]
    [InlineData(ExplicitMethod.Euler, 1.0)]
    [InlineData(ExplicitMethod.RungeKutta4, 4.0)]
    public void ErrorShrinksAtTextbookOrder_AsStepHalves(ExplicitMethod method, double order)
    {
        // Global error of forward Euler is O(dt), of classical RK4 O(dt^4) (E. Hairer, S. P. Norsett,
        // G. Wanner, "Solving Ordinary Differential Equations I", 2nd ed., Springer 1993, sections
        // II.1 and II.3). Reference: the exact symmetric-eigen propagator.
        var rates = DrivenThreeState();
        double[] initial = [0.0, 0.2, 0.8];
        double[] times = [2.0];
        var exact = new SymmetricEigenPropagator(rates, new ManagedLinearAlgebra()).Propagate(initial, times);
        var logSteps = new List<double>();
        var logErrors = new List<double>();
        for (var halvings = 4; halvings <= 8; halvings++)
        {
            var dt = 2.0 / (1 << halvings);
            var trajectory = ExplicitPropagatorChoice.Create(rates, method, dt).Propagate(initial, times);
            logSteps.Add(Math.Log2(dt));
            logErrors.Add(Math.Log2(TrajectoryComparison.Compare(exact, trajectory).MaxAbsolute));
        }

        // Least-squares slope of log2(error) against log2(dt): the observed order.
        var (meanX, meanY) = (logSteps.Average(), logErrors.Average());
        var slope = logSteps.Zip(logErrors, (x, y) => (x - meanX) * (y - meanY)).Sum() / logSteps.Sum(x => (x - meanX) * (x - meanX));
        Assert.InRange(slope, order - 0.15, order + 0.15);

        // Each single halving, too (the last error of RK4 is ~1e-9, far above rounding).
        for (var k = 1; k < logErrors.Count; k++)
        {
            Assert.InRange(logErrors[k - 1] - logErrors[k], order - 0.2, order + 0.2);
        }
    }

    [Fact]
    public void ForwardEuler_ShortensLastStepToLandOnEachOutput()
    {
        // Decay 0 -> 1 at rate k: one Euler step multiplies P0 by (1 - h k) (definition of the
        // method, common practice). dt = 0.1 to t = 0.35 takes steps 0.1, 0.1, 0.1, 0.05; from
        // 0.35 to 0.6 the grid restarts: 0.1, 0.1, 0.05.
        const double k = 2.0;
        var rates = TestRates.Build(new double[,] { { 0, 0 }, { k, 0 } });
        var trajectory = new ForwardEulerPropagator(rates, 0.1).Propagate([1, 0], [0.35, 0.6]);
        Assert.Equal([0.35, 0.6], trajectory.Times);
        var first = Math.Pow(1 - (0.1 * k), 3) * (1 - (0.05 * k));
        var second = first * Math.Pow(1 - (0.1 * k), 2) * (1 - (0.05 * k));
        Assert.Equal(first, trajectory.Populations[0][0], 14);
        Assert.Equal(second, trajectory.Populations[1][0], 14);
        Assert.Equal(1 - second, trajectory.Populations[1][1], 14);
    }

    [Fact]
    public void FixedStep_ReportsProgressAtMostOneHundredTimes()
    {
        var recorder = new ProgressRecorder();
        new RungeKutta4Propagator(DrivenThreeState(), 1e-4).Propagate([1, 0, 0], [0.0, 5.0, 10.0], recorder);
        Assert.InRange(recorder.Values.Count, 50, 100);
        Assert.Equal(1.0, recorder.Values[^1]);
        Assert.All(recorder.Values.Zip(recorder.Values.Skip(1)), pair => Assert.True(pair.Second > pair.First));
    }

    [Fact]
    public void FixedStep_AllocationDoesNotGrowWithStepCount()
    {
        var rates = DrivenThreeState();
        double[] times = [0.5, 1.0];
        long Allocated(double dt)
        {
            var propagator = new RungeKutta4Propagator(rates, dt);
            var before = GC.GetAllocatedBytesForCurrentThread();
            propagator.Propagate([1, 0, 0], times);
            return GC.GetAllocatedBytesForCurrentThread() - before;
        }

        // Warm-up of both step counts: first-call and tiering costs of the runtime are not the
        // method's. The smallest object is 24 bytes, so a per-step allocation would show as at
        // least 2.4 MB over 100000 steps; the runtime's own work on this thread while the loop
        // runs (tier-up and on-stack replacement of the hot method) adds a few kilobytes at times
        // (6968 against 608 bytes in one CI run), which the 64 KB bound leaves out.
        Allocated(0.1);
        Allocated(1e-5);
        var few = Allocated(0.1);
        var many = Allocated(1e-5);
        Assert.True(many - few < 65_536, $"{few} bytes for 10 steps, {many} bytes for 100000 steps");
    }

    [Fact]
    public void ExplicitChoice_CreatesTheRequestedMethod()
    {
        var rates = DrivenThreeState();
        Assert.Equal("euler", ExplicitPropagatorChoice.Create(rates, ExplicitMethod.Euler, 0.01).Name);
        var rk4 = ExplicitPropagatorChoice.Create(rates, ExplicitMethod.RungeKutta4, 0.01);
        Assert.Equal("rk4", rk4.Name);
        Assert.Equal(0.01, rk4.TimeStep);
        Assert.Contains("dt = 1e-2", rk4.Reason, StringComparison.Ordinal);
        Assert.Throws<ArgumentOutOfRangeException>(() => ExplicitPropagatorChoice.Create(rates, ExplicitMethod.Euler, 0.0));
    }
}

/// <summary>Records progress synchronously (Progress&lt;T&gt; would post to the thread pool).</summary>
internal sealed class ProgressRecorder : IProgress<double>
{
    public List<double> Values { get; } = [];

    public void Report(double value) => Values.Add(value);
}
