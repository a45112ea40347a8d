using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using Xunit;

namespace RateDeck.Tests.Propagation;

public class LongRunAndExtremeTests
{
    private static readonly double _ln10 = Math.Log(10);

    [Fact]
    public void UndrivenDetailedBalance_ConservesProbabilityOverMillionRelaxationTimes()
    {
        // Without pumping or losses the columns of K sum to zero, so sum_i P_i is constant, and the
        // populations relax to the detailed-balance equilibrium pi (SPEC 2; common practice).
        const int n = 20;
        var logWeight = Enumerable.Range(0, n).Select(i => -0.5 * i).ToArray();
        var rates = TestRates.Completed(logWeight, (i, j) => j - i == 1 ? 1.0 : j - i == 2 ? 0.3 : 0.0);
        var initial = new double[n];
        initial[n / 2] = 1.0;
        var chosen = ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra(), initial: initial);
        var symmetric = Assert.IsType<SymmetricEigenPropagator>(chosen);
        Assert.Equal(1, symmetric.ZeroEigenvalueCount);

        var relaxationTime = 1.0 / -symmetric.Eigenvalues.Where(l => l < 0).Max();
        var times = Enumerable.Range(0, 7).Select(k => relaxationTime * Math.Pow(10, k)).Prepend(0.0).ToArray();
        var trajectory = symmetric.Propagate(initial, times);
        foreach (var populations in trajectory.Populations)
        {
            Assert.True(Math.Abs(populations.Sum() - 1.0) <= 1e-12, $"total {populations.Sum() - 1.0:E3} off");
        }

        var pi = TestRates.Normalised(logWeight).Select(Math.Exp).ToArray();
        for (var i = 0; i < n; i++)
        {
            Assert.True(Math.Abs(trajectory.Populations[^1][i] - pi[i]) <= 1e-12, $"state {i}");
        }
    }

    [Fact]
    public void SymmetricPath_StaysFiniteAndCorrect_WhenPiSpans700Decades()
    {
        // States A, B relax into each other (kf = 0.3 A -> B, kb = 1.7 B -> A); state C lies
        // 700 decades above, fed from B at 2e-700 (underflows to 0) and returning at 2.
        // exp(-0.5 ln pi_C) = 1e350 overflows by itself. To all digits of a double, A and B follow
        // the two-state closed form P_A = P_eq + (P_A(0) - P_eq) exp(-(kf + kb) t), P_eq = kb / (kf + kb)
        // (first-order reversible kinetics, e.g. Atkins' Physical Chemistry), and P_C stays 0
        // (its true value, below 1e-700, is not representable).
        const double kf = 0.3, kb = 1.7;
        double[] logWeight = [Math.Log(kb), Math.Log(kf), -700 * _ln10];
        var rates = TestRates.Completed(logWeight, (i, j) => (i, j) switch { (0, 1) => kb, (1, 2) => 2.0, _ => 0.0 });
        Assert.True(double.IsPositiveInfinity(Math.Exp(-0.5 * rates.States.LogEquilibrium[2])));
        double[] initial = [0.9, 0.1, 0.0];
        double[] times = [0.0, 0.2, 1.0, 5.0, 50.0];

        var chosen = ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra(), initial: initial);
        Assert.Equal("symmetric-eigen", chosen.Name);
        var trajectory = chosen.Propagate(initial, times);
        for (var k = 0; k < times.Length; k++)
        {
            var expected = (kb / (kf + kb)) + ((initial[0] - (kb / (kf + kb))) * Math.Exp(-(kf + kb) * times[k]));
            var p = trajectory.Populations[k];
            Assert.All(p, v => Assert.True(double.IsFinite(v)));
            Assert.True(Math.Abs(p[0] - expected) <= 1e-14, $"A at t = {times[k]}");
            Assert.True(Math.Abs(p[1] - (1 - expected)) <= 1e-14, $"B at t = {times[k]}");
            Assert.True(Math.Abs(p[2]) <= 1e-300, $"C at t = {times[k]}: {p[2]}");
        }

        // Without the initial state the choice must assume the worst start (all in C) and avoid the symmetric path.
        Assert.Equal("pade-exponential", ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra()).Name);
    }

    [Fact]
    public void DrivenSymmetricPath_StaysFinite_WhenPiSpans700Decades()
    {
        // The driven two-state closed form (DrivenTwoStateSolution) with a third state 700 decades
        // above B attached as in the undriven case: to double precision it does not take part.
        var solution = new DrivenTwoStateSolution(Kf: 0.8, Kb: 0.5, Loss: 0.3, Pumping: 0.2);
        double[] logWeight = [Math.Log(solution.Kb), Math.Log(solution.Kf), -700 * _ln10];
        var rates = TestRates.Completed(
            logWeight, (i, j) => (i, j) switch { (0, 1) => solution.Kb, (1, 2) => 1.0, _ => 0.0 }, loss: [0, solution.Loss, 0], pumping: [solution.Pumping, 0, 0]);
        double[] initial = [0.1, 0.4, 0.0];
        double[] times = [0.0, 0.5, 2.0, 20.0];
        var trajectory = new SymmetricEigenPropagator(rates, new ManagedLinearAlgebra()).Propagate(initial, times);
        for (var k = 0; k < times.Length; k++)
        {
            var expected = solution.At(initial[..2], times[k]);
            Assert.True(Math.Abs(trajectory.Populations[k][0] - expected[0]) <= 1e-13, $"A at t = {times[k]}");
            Assert.True(Math.Abs(trajectory.Populations[k][1] - expected[1]) <= 1e-13, $"B at t = {times[k]}");
            Assert.True(Math.Abs(trajectory.Populations[k][2]) <= 1e-300, $"C at t = {times[k]}");
        }
    }

    [Fact]
    public void StartInImprobableState_TakesPadePathAndMatchesBatemanChain()
    {
        // Ladder ground - middle - top with the middle 350 and the top 700 decades above the ground:
        // the upward rates (1e-350 of the downward ones) vanish and the cascade top -> middle (a)
        // -> ground (b) is the Bateman chain (H. Bateman, Proc. Cambridge Philos. Soc. 15 (1910) 423):
        // P_top = e^(-a t), P_mid = a / (b - a) (e^(-a t) - e^(-b t)), P_ground = 1 - P_top - P_mid.
        // The symmetric path cannot resolve this start (its eigenvectors would need components of
        // 1e-350): it must refuse, and the choice must take the Pade path and say why.
        const double a = 1.0, b = 3.0;
        double[] logWeight = [0.0, -350 * _ln10, -700 * _ln10];
        var rates = TestRates.Completed(logWeight, (i, j) => (i, j) switch { (0, 1) => b, (1, 2) => a, _ => 0.0 });
        double[] initial = [0, 0, 1];
        double[] times = [0.0, 0.5, 2.0, 10.0];

        var symmetric = new SymmetricEigenPropagator(rates, new ManagedLinearAlgebra());
        Assert.Throws<InvalidOperationException>(() => symmetric.Propagate(initial, times));
        var chosen = ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra(), initial: initial);
        Assert.Equal("pade-exponential", chosen.Name);
        Assert.Contains("700 decades", chosen.Reason, StringComparison.Ordinal);

        var trajectory = chosen.Propagate(initial, times);
        for (var k = 0; k < times.Length; k++)
        {
            var t = times[k];
            var top = Math.Exp(-a * t);
            var middle = a / (b - a) * (Math.Exp(-a * t) - Math.Exp(-b * t));
            double[] expected = [1 - top - middle, middle, top];
            for (var i = 0; i < 3; i++)
            {
                Assert.True(Math.Abs(trajectory.Populations[k][i] - expected[i]) <= 1e-14, $"state {i} at t = {t}");
            }
        }
    }
}
