using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.Rates;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Propagation;

/// <summary>
/// The three exact paths are different algorithms for the same exp(K t) (a symmetric and a general
/// eigen-solver from MathNet through the managed provider, and Pade scaling and squaring), so on a
/// matrix all three can handle they must agree to rounding (common practice: cross-checking methods).
/// </summary>
public class PathAgreementTests
{
    private static readonly double[] _times = [0.0, 0.1, 1.0, 10.0, 100.0];

    /// <summary>Eight states over ~3 decades, nearest and next-nearest transfer, completed by detailed balance.</summary>
    private static RateMatrix Ladder(bool driven) => TestRates.Completed(
        Enumerable.Range(0, 8).Select(i => -0.8 * i).ToArray(),
        (i, j) => j - i <= 2 ? 1.0 / ((j - i) * (j - i)) : 0.0,
        loss: driven ? [0, 0, 0, 0, 0, 0, 0, 0.05] : null,
        pumping: driven ? [0.4, 0, 0, 0, 0, 0, 0, 0] : null);

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void ExactPaths_AgreeOnDetailedBalanceMatrix(bool driven)
    {
        var rates = Ladder(driven);
        double[] initial = [0, 0, 0, 0.5, 0, 0, 0, 0.5];
        var trajectories = TestRates.ExactPaths(rates).Select(p => (p.Name, Trajectory: p.Propagate(initial, _times))).ToList();
        foreach (var (name, trajectory) in trajectories.Skip(1))
        {
            var difference = TrajectoryComparison.Compare(trajectories[0].Trajectory, trajectory);
            Assert.True(difference.MaxRelativeToTotal <= 1e-10, $"{trajectories[0].Name} vs {name}: {difference}");
        }
    }

    [Fact]
    public void PadeReuseForEqualSpacing_MatchesOneExponentialPerTime()
    {
        // Repeated multiplication by exp(A dt) is exact by the semigroup property; a single
        // output time always takes its own exponential, so the two routes can be compared.
        var rates = Ladder(driven: true);
        double[] initial = [1, 0, 0, 0, 0, 0, 0, 0];
        var pade = new PadeExponentialPropagator(rates, TestProvider.Selected);
        var times = Enumerable.Range(0, 41).Select(k => 0.25 * k).ToArray();
        var reused = pade.Propagate(initial, times);
        for (var k = 0; k < times.Length; k++)
        {
            var direct = pade.Propagate(initial, [times[k]]).Populations[0];
            for (var i = 0; i < direct.Length; i++)
            {
                Assert.True(Math.Abs(reused.Populations[k][i] - direct[i]) <= 1e-13, $"state {i} at t = {times[k]}");
            }
        }
    }

    [Fact]
    public void Choice_ReasonNamesPathAndNumbers()
    {
        // The same ladder taken as given: detailed balance must come from the reported violation.
        var completed = Ladder(driven: false);
        var n = completed.Count;
        var offDiagonal = new double[n, n];
        for (var i = 0; i < n; i++)
        {
            for (var j = 0; j < n; j++)
            {
                offDiagonal[i, j] = i == j ? 0 : completed.Generator[i, j];
            }
        }

        var given = TestRates.Build(offDiagonal, logPi: completed.States.LogEquilibrium, origin: BalanceOrigin.TakenAsGiven);
        var la = new ManagedLinearAlgebra();

        var balanced = ExactPropagatorChoice.Choose(given, la, DetailedBalance.Analyze(given));
        Assert.Equal("symmetric-eigen", balanced.Name);
        Assert.Contains("detailed balance holds for the deck's pi (worst pairwise violation", balanced.Reason, StringComparison.Ordinal);

        // One rate 20 % too large: that pair now violates balance by 1 - 1/1.2 = 0.167.
        offDiagonal[2, 1] *= 1.2;
        var perturbed = TestRates.Build(offDiagonal, logPi: completed.States.LogEquilibrium, origin: BalanceOrigin.TakenAsGiven);
        var unbalanced = ExactPropagatorChoice.Choose(perturbed, la, DetailedBalance.Analyze(perturbed));
        var general = Assert.IsType<GeneralEigenPropagator>(unbalanced);
        Assert.True(general.EigenvectorCondition < ExactPropagatorChoice.ConditionThreshold);
        Assert.Contains("no detailed balance for the deck's pi (worst pairwise violation 0.167", general.Reason, StringComparison.Ordinal);
        Assert.Contains("eigenvector condition estimate", general.Reason, StringComparison.Ordinal);

        var byConstruction = ExactPropagatorChoice.Choose(completed, la, DetailedBalance.Analyze(completed));
        Assert.Contains("by construction", byConstruction.Reason, StringComparison.Ordinal);
    }

    [Fact]
    public void ExactPropagators_ReportProgressAtMostOneHundredTimes()
    {
        var rates = Ladder(driven: true);
        var times = Enumerable.Range(0, 1000).Select(k => 0.01 * k).ToArray();
        foreach (var propagator in TestRates.ExactPaths(rates))
        {
            var recorder = new ProgressRecorder();
            propagator.Propagate([1, 0, 0, 0, 0, 0, 0, 0], times, recorder);
            Assert.InRange(recorder.Values.Count, 1, 100);
            Assert.Equal(1.0, recorder.Values[^1]);
        }
    }
}
