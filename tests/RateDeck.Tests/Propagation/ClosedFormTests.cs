using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using Xunit;

namespace RateDeck.Tests.Propagation;

public class ClosedFormTests
{
    private static readonly double[] _times = [0.0, 0.1, 0.5, 1.0, 2.0, 5.0, 10.0];

    [Fact]
    public void TwoStateRelaxation_MatchesClosedForm()
    {
        // First-order reversible kinetics 1 <-> 2 with forward rate kf (1 -> 2) and backward kb:
        // P1(t) = P1eq + (P1(0) - P1eq) exp(-(kf + kb) t), P1eq = kb / (kf + kb)
        // (textbook result, e.g. Atkins' Physical Chemistry, "reactions approaching equilibrium").
        const double kf = 0.3, kb = 1.7;
        var rates = TestRates.Completed([Math.Log(kb), Math.Log(kf)], (_, _) => kb);
        Assert.Equal(kf, rates.Generator[1, 0], 15);
        const double p10 = 0.9;
        const double p1eq = kb / (kf + kb);

        foreach (var propagator in TestRates.ExactPaths(rates).Append(new RungeKutta4Propagator(rates, 1e-3)))
        {
            var tolerance = propagator is FixedStepPropagator ? 1e-11 : 1e-14;
            var trajectory = propagator.Propagate([p10, 1 - p10], _times);
            for (var k = 0; k < _times.Length; k++)
            {
                var expected = p1eq + ((p10 - p1eq) * Math.Exp(-(kf + kb) * _times[k]));
                Assert.True(Math.Abs(trajectory.Populations[k][0] - expected) <= tolerance, $"{propagator.Name} at t = {_times[k]}");
                Assert.True(Math.Abs(trajectory.Populations[k][1] - (1 - expected)) <= tolerance, $"{propagator.Name} at t = {_times[k]}");
            }
        }
    }

    [Fact]
    public void DrivenTwoState_MatchesClosedFormTransientAndSteadyState()
    {
        // Closed form derived by hand in DrivenTwoStateSolution (steady state and Sylvester's formula).
        var solution = new DrivenTwoStateSolution(Kf: 0.8, Kb: 0.5, Loss: 0.3, Pumping: 0.2);
        var rates = TestRates.Completed(
            [Math.Log(solution.Kb), Math.Log(solution.Kf)], (_, _) => solution.Kb, loss: [0, solution.Loss], pumping: [solution.Pumping, 0]);
        double[] initial = [0.1, 0.4];
        double[] times = [0.0, 0.25, 1.0, 3.0, 10.0, 400.0];

        var chosen = ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra(), initial: initial);
        Assert.Equal("symmetric-eigen", chosen.Name);
        foreach (var propagator in TestRates.ExactPaths(rates).Append(chosen).Append(new RungeKutta4Propagator(rates, 1e-3)))
        {
            var tolerance = propagator is FixedStepPropagator ? 1e-11 : 1e-13;
            var trajectory = propagator.Propagate(initial, times);
            for (var n = 0; n < times.Length; n++)
            {
                var expected = solution.At(initial, times[n]);
                for (var i = 0; i < 2; i++)
                {
                    Assert.True(
                        Math.Abs(trajectory.Populations[n][i] - expected[i]) <= tolerance * Math.Max(1, expected[i]),
                        $"{propagator.Name} state {i} at t = {times[n]}: {trajectory.Populations[n][i]} vs {expected[i]}");
                }
            }

            // At 400 the slowest mode has decayed by exp(400 l+) < 1e-13: the steady state itself.
            Assert.Equal(solution.SteadyState[0], trajectory.Populations[^1][0], 10);
            Assert.Equal(solution.SteadyState[1], trajectory.Populations[^1][1], 10);
        }
    }

    [Fact]
    public void EqualRateDecayChain_MatchesBatemanSolution()
    {
        // Decay chain 1 -> 2 -> 3 -> (lost) with equal rates k: the equal-rate limit of the
        // Bateman solution (H. Bateman, Proc. Cambridge Philos. Soc. 15 (1910) 423):
        // P1 = e^(-kt), P2 = kt e^(-kt), P3 = (kt)^2 / 2 e^(-kt). K is one 3x3 Jordan block,
        // so the choice must avoid eigen-decompositions.
        const double k = 1.3;
        var rates = TestRates.Build(new double[,] { { 0, 0, 0 }, { k, 0, 0 }, { 0, k, 0 } }, loss: [0, 0, k]);
        var chosen = ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra());
        Assert.Equal("pade-exponential", chosen.Name);
        Assert.Contains("condition", chosen.Reason, StringComparison.Ordinal);
        double[] times = [0.0, 0.4, 1.0, 2.5, 8.0];
        var trajectory = chosen.Propagate([1, 0, 0], times);
        for (var n = 0; n < times.Length; n++)
        {
            var kt = k * times[n];
            double[] expected = [Math.Exp(-kt), kt * Math.Exp(-kt), kt * kt / 2 * Math.Exp(-kt)];
            for (var i = 0; i < 3; i++)
            {
                Assert.True(Math.Abs(trajectory.Populations[n][i] - expected[i]) <= 1e-14, $"state {i} at t = {times[n]}");
            }
        }
    }
}
