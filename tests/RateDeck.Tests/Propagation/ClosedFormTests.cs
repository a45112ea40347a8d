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
        // Pump s into state 1, transfer kf (1 -> 2) and kb (2 -> 1), loss g from state 2:
        //   dP1/dt = -kf P1 + kb P2 + s,   dP2/dt = kf P1 - (kb + g) P2.
        // Steady state (derived by hand): the second equation gives P2 = kf P1 / (kb + g); the
        // first then gives kf g P1 / (kb + g) = s, so P1* = s (kb + g) / (kf g) and P2* = s / g
        // (outflow g P2* balances the pump). Transient: P(t) = P* + exp(K t) (P(0) - P*), with
        // K = [[-kf, kb], [kf, -(kb + g)]], trace -(kf + kb + g), determinant kf g, real distinct
        // eigenvalues l+- = (tr +- sqrt(tr^2 - 4 det)) / 2, and for a 2x2 matrix with distinct
        // eigenvalues Sylvester's formula exp(K t) = [e^(l+ t) (K - l- I) - e^(l- t) (K - l+ I)] / (l+ - l-)
        // (Moler and Van Loan, SIAM Review 45 (2003) 3, the interpolation methods).
        const double kf = 0.8, kb = 0.5, g = 0.3, s = 0.2;
        var rates = TestRates.Completed([Math.Log(kb), Math.Log(kf)], (_, _) => kb, loss: [0, g], pumping: [s, 0]);
        double[] initial = [0.1, 0.4];
        double[] steady = [s * (kb + g) / (kf * g), s / g];
        const double trace = -(kf + kb + g), determinant = kf * g;
        var root = Math.Sqrt((trace * trace) - (4 * determinant));
        var (plus, minus) = ((trace + root) / 2, (trace - root) / 2);
        double[,] k = { { -kf, kb }, { kf, -(kb + g) } };
        double[] times = [0.0, 0.25, 1.0, 3.0, 10.0, 400.0];

        var la = new ManagedLinearAlgebra();
        var chosen = ExactPropagatorChoice.Choose(rates, la, double.NaN);
        Assert.Equal("symmetric-eigen", chosen.Name);
        foreach (var propagator in TestRates.ExactPaths(rates).Append(chosen).Append(new RungeKutta4Propagator(rates, 1e-3)))
        {
            var tolerance = propagator is FixedStepPropagator ? 1e-11 : 1e-13;
            var trajectory = propagator.Propagate(initial, times);
            for (var n = 0; n < times.Length; n++)
            {
                var (ep, em) = (Math.Exp(plus * times[n]), Math.Exp(minus * times[n]));
                for (var i = 0; i < 2; i++)
                {
                    var expected = steady[i];
                    for (var j = 0; j < 2; j++)
                    {
                        var delta = i == j ? 1.0 : 0.0;
                        var exponential = ((ep * (k[i, j] - (minus * delta))) - (em * (k[i, j] - (plus * delta)))) / (plus - minus);
                        expected += exponential * (initial[j] - steady[j]);
                    }

                    Assert.True(
                        Math.Abs(trajectory.Populations[n][i] - expected) <= tolerance * Math.Max(1, expected),
                        $"{propagator.Name} state {i} at t = {times[n]}: {trajectory.Populations[n][i]} vs {expected}");
                }
            }

            // At 400 the slowest mode has decayed by exp(400 l+) < 1e-13: the steady state itself.
            Assert.Equal(steady[0], trajectory.Populations[^1][0], 10);
            Assert.Equal(steady[1], trajectory.Populations[^1][1], 10);
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
        var chosen = ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra(), 1.0);
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
