using System.Text.Json;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Tests.Cli;
using RateDeck.Tests.Propagation;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Stiff;

/// <summary>Closed forms at extreme stiffness: the slow rate of a three-state chain, birth-death stationary laws, a driven chain.</summary>
public class StiffClosedFormTests
{
    public static TheoryData<double> StiffnessRatios => new() { 1e6, 1e12, 1e18 };

    /// <summary>
    /// A three-state chain a - b - c (energies 0, 1, 2; kT = 1) with downward rates b -> a = 1 and
    /// c -> b = <paramref name="fast"/>, completed upward by detailed balance. With alpha1 = a -> b,
    /// beta1 = b -> a, alpha2 = b -> c, beta2 = c -> b, the non-zero eigenvalues of -K are the roots
    /// of mu^2 - T mu + D with T = alpha1 + beta1 + alpha2 + beta2 (the trace) and
    /// D = alpha1 alpha2 + beta1 beta2 + alpha1 beta2 (the sum of the principal 2 x 2 minors,
    /// derived here); the small root is taken as 2 D / (T + sqrt(T^2 - 4 D)), which does not cancel.
    /// </summary>
    [Theory]
    [MemberData(nameof(StiffnessRatios))]
    public void ThreeStateChain_SlowRateMatchesTheQuadraticsSmallRoot(double fast)
    {
        var rates = TestRates.Completed([0, -1, -2], (i, j) => j == i + 1 ? (i == 0 ? 1.0 : fast) : 0.0);
        var (alpha1, beta1, alpha2, beta2) = (rates.Generator[1, 0], rates.Generator[0, 1], rates.Generator[2, 1], rates.Generator[1, 2]);
        var trace = alpha1 + beta1 + alpha2 + beta2;
        var determinant = (alpha1 * alpha2) + (beta1 * beta2) + (alpha1 * beta2);
        var root = Math.Sqrt((trace * trace) - (4 * determinant));
        var (slow, quick) = (2 * determinant / (trace + root), (trace + root) / 2);

        var spectrum = Spectrum.Compute(rates, new ManagedLinearAlgebra());
        var report = StepLimits.Analyze(spectrum, rates, 10, null);

        Assert.True(spectrum.IsResolved, spectrum.Unresolved);
        Assert.Equal(slow, report.SlowestRate!.Value, slow * 1e-10);
        Assert.Equal(slow, -spectrum.Eigenvalues[1], slow * 1e-10);
        Assert.Equal(quick, -spectrum.Eigenvalues[0], quick * 1e-10);
        Assert.Equal(1, spectrum.NullDimension);
        Assert.True(Math.Abs(spectrum.Eigenvalues[2]) <= spectrum.ZeroTolerance);
    }

    [Trait("Through", "program")]
    [Fact]
    public void StiffnessVerb_ReportsTheSmallRootAtRatioTenToTheEighteen()
    {
        using var folder = new TempFolder();
        File.WriteAllText(folder.File("chain.csv"), "from,to,rate\nb,a,1\nc,b,1e18\n");
        File.WriteAllText(folder.File("chain.toml"), """
            format = 1
            [temperature]
            kT = 1
            [states]
            coordinates = [0, 1, 2]
            labels = ["a", "b", "c"]
            [energies]
            values = [0, 1, 2]
            [transfer]
            kind = "one_way"
            direction = "toward_smaller"
            csv = "chain.csv"
            [run]
            t_end = 10
            """);
        var (alpha1, beta1, alpha2, beta2) = (Math.Exp(-1), 1.0, 1e18 * Math.Exp(-1), 1e18);
        var trace = alpha1 + beta1 + alpha2 + beta2;
        var determinant = (alpha1 * alpha2) + (beta1 * beta2) + (alpha1 * beta2);
        var slow = 2 * determinant / (trace + Math.Sqrt((trace * trace) - (4 * determinant)));

        var (code, output, error) = CliRunner.Run("stiffness", folder.File("chain.toml"), "--json");

        Assert.True(code == 0, error);
        using var json = JsonDocument.Parse(output);
        Assert.Equal(slow, json.RootElement.GetProperty("slowest_rate").GetDouble(), slow * 1e-10);
    }

    /// <summary>
    /// A birth-death chain's stationary law is the product of rate ratios, p_(i+1) / p_i =
    /// up_i / down_(i+1) (the detailed-balance form of a birth-death chain, common practice). The
    /// matrix is taken as given, so the law comes from the subtraction-free elimination, not from pi.
    /// </summary>
    [Theory]
    [MemberData(nameof(StiffnessRatios))]
    public void StationaryLaw_OfABirthDeathChainMatchesTheProductOfRateRatios(double ratio)
    {
        double[] up = [ratio, 1.0, 1.0 / ratio, 3.0, ratio];
        double[] down = [1.0, ratio, 2.0, 1.0 / ratio, 0.5];
        var n = up.Length + 1;
        var offDiagonal = new double[n, n];
        for (var i = 0; i < up.Length; i++)
        {
            offDiagonal[i + 1, i] = up[i];
            offDiagonal[i, i + 1] = down[i];
        }

        var rates = TestRates.Build(offDiagonal);
        var expected = new double[n];
        expected[0] = 1;
        for (var i = 0; i < up.Length; i++)
        {
            expected[i + 1] = expected[i] * up[i] / down[i];
        }

        var total = expected.Sum();

        var law = StationaryLaw.OfClass(rates, [.. Enumerable.Range(0, n)]);

        for (var i = 0; i < n; i++)
        {
            Assert.Equal(expected[i] / total, law[i], expected[i] / total * 1e-13);
        }
    }

    /// <summary>
    /// A chain pumped at the top (s into the last state) with a loss g from the bottom: in the
    /// steady state every edge carries the net flux s downward, so p_1 = s / g and
    /// p_(i+1) = (s + up_i p_i) / down_(i+1), a recursion without subtraction (derived here).
    /// </summary>
    [Theory]
    [MemberData(nameof(StiffnessRatios))]
    public void DrivenSteadyState_OfAStiffChainMatchesTheFluxRecursion(double ratio)
    {
        double[] up = [1.0, ratio, 1.0 / ratio];
        double[] down = [ratio, 2.0, 1.0];
        var n = up.Length + 1;
        var offDiagonal = new double[n, n];
        for (var i = 0; i < up.Length; i++)
        {
            offDiagonal[i + 1, i] = up[i];
            offDiagonal[i, i + 1] = down[i];
        }

        var (pump, loss) = (2.0, 1e-3);
        var pumping = new double[n];
        pumping[^1] = pump;
        var losses = new double[n];
        losses[0] = loss;
        var rates = TestRates.Build(offDiagonal, losses, pumping);
        var expected = new double[n];
        expected[0] = pump / loss;
        for (var i = 0; i < up.Length; i++)
        {
            expected[i + 1] = (pump + (up[i] * expected[i])) / down[i];
        }

        var algebra = new ManagedLinearAlgebra();
        var steady = SteadyState.Compute(rates, Spectrum.Compute(rates, algebra), new double[n], algebra);

        Assert.Equal(SteadyStateKind.Driven, steady.Kind);
        for (var i = 0; i < n; i++)
        {
            Assert.Equal(expected[i], steady.Populations![i], expected[i] * 1e-13);
        }
    }

    [Fact]
    public void TwoStatesFourteenHundredKTApart_AreOneClosedClass()
    {
        // The completed upward rate is e^-1400 times the measured 1.0, below the smallest double:
        // it underflows to zero in K, but the pair carries a rate, so the states form one class.
        var rates = TestRates.Completed([0, -1400], (_, _) => 1.0);

        var classes = TransitionGraph.Classify(rates);

        Assert.Equal(0.0, rates.Generator[1, 0]);
        Assert.Single(classes.Closed);
        Assert.Equal([0, 1], classes.Closed[0].States);
        Assert.Empty(classes.Transient);
    }

    [Trait("Through", "program")]
    [Fact]
    public void CheckVerb_OnTwoStatesFourteenHundredKTApart_ReportsOneClosedClass()
    {
        using var folder = new TempFolder();
        File.WriteAllText(folder.File("rates.csv"), "from,to,rate\nup,low,1.0\n");
        File.WriteAllText(folder.File("far.toml"), """
            format = 1
            [temperature]
            kT = 1
            [states]
            coordinates = [0, 1400]
            labels = ["low", "up"]
            [energies]
            values = [0, 1400]
            [transfer]
            kind = "one_way"
            direction = "toward_smaller"
            csv = "rates.csv"
            [run]
            t_end = 1
            """);

        var (code, output, error) = CliRunner.Run("check", folder.File("far.toml"), "--json");

        Assert.True(code == 0, error + output);
        using var json = JsonDocument.Parse(output);
        var classes = json.RootElement.GetProperty("closed_classes").EnumerateArray().Select(c => string.Join(" ", c.EnumerateArray().Select(s => s.GetString()))).ToArray();
        Assert.Equal(["low up"], classes);
        Assert.Equal(0, json.RootElement.GetProperty("transient_states").GetArrayLength());
    }

}
