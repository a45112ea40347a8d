using RateDeck.Decks;
using RateDeck.Mechanics;
using RateDeck.States;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.States;

public class StateSpaceBuilderTests
{
    // k_B / (h c) = 0.695 034 800 cm^-1 K^-1 (CODATA 2018; value from memory).
    private const double _boltzmannInWavenumbersPerKelvin = 0.695034800;

    // Area of the unit sphere in d dimensions, S_{d-1} = 2 pi^(d/2) / Gamma(d/2): 2, 2 pi, 4 pi, 2 pi^2
    // for d = 1..4 (textbook; e.g. NIST DLMF section 5.19(iii), cited from memory).
    [Theory]
    [InlineData(1, 2.0)]
    [InlineData(2, 2.0 * Math.PI)]
    [InlineData(3, 4.0 * Math.PI)]
    [InlineData(4, 2.0 * Math.PI * Math.PI)]
    public void IsotropicMeasure_UnitSphereArea_MatchesTextbook(int dimension, double area)
    {
        Assert.Equal(area, Math.Exp(StateSpaceBuilder.LogUnitSphereArea(dimension)), area * 1e-14);

        // Through the builder: shells of radius 1 and 2, widths 1 and 0.5, weight S_{d-1} x^(d-1) dx.
        var deck = TestDecks.Create([1.0, 2.0], [0.0, 0.0], new IsotropicWeights(dimension, TestDecks.At(4)), TestDecks.NoCoupling, cellWidths: [1.0, 0.5]);
        var states = StateSpaceBuilder.Build(deck);
        var outer = area * Math.Pow(2.0, dimension - 1) * 0.5;
        Assert.Equal(area, Math.Exp(states.LogWeights[0]), area * 1e-14);
        Assert.Equal(outer, Math.Exp(states.LogWeights[1]), outer * 1e-14);
    }

    // The recursion S_{d+1} = 2 pi S_{d-1} / d (from Gamma(z + 1) = z Gamma(z); textbook) checked
    // far beyond where pi^(d/2) / Gamma(d/2) could be formed in doubles without logarithms.
    [Fact]
    public void IsotropicMeasure_HighDimensions_FollowAreaRecursionInLogSpace()
    {
        for (var d = 1; d <= 2000; d++)
        {
            var step = StateSpaceBuilder.LogUnitSphereArea(d + 2) - StateSpaceBuilder.LogUnitSphereArea(d);
            Assert.True(double.IsFinite(StateSpaceBuilder.LogUnitSphereArea(d + 2)));
            Assert.Equal(Math.Log(2.0 * Math.PI / d), step, 1e-10);
        }
    }

    // Hydrogen terms n = 1..4, statistical weight g = 2 n^2, term energies from the NIST Atomic Spectra
    // Database H I levels (values from memory, rounded to 0.1 cm^-1; the fine-structure spread within a
    // term, under 0.4 cm^-1, is far below kT here). Closed form: Boltzmann ratio
    // pi_j / pi_i = g_j / g_i exp(-(E_j - E_i) / kT) (common practice; any statistical-mechanics text).
    [Fact]
    public void HydrogenTerms_At10000K_MatchBoltzmannClosedForm()
    {
        double[] energies = [0.0, 82259.1, 97492.3, 102823.9];
        double[] g = [2, 8, 18, 32];
        AssertBoltzmannPopulations(energies, g, 10000.0 * _boltzmannInWavenumbersPerKelvin);
    }

    // Sodium 3s 2S1/2, 3p 2P1/2, 3p 2P3/2 (g = 2J + 1 = 2, 2, 4) at 16956.2 and 16973.4 cm^-1, the D lines,
    // from the NIST Atomic Spectra Database (values from memory). A flame-like 2500 K.
    [Fact]
    public void SodiumResonanceLevels_At2500K_MatchBoltzmannClosedForm()
    {
        AssertBoltzmannPopulations([0.0, 16956.2, 16973.4], [2, 2, 4], 2500.0 * _boltzmannInWavenumbersPerKelvin);
    }

    // Energies 0..1400 kT: Boltzmann factors down to e^-1400 ~ 1e-608, beyond double range.
    [Fact]
    public void BoltzmannFactorsSpanning600Decades_StayFiniteWithExactLogRatios()
    {
        var energies = Enumerable.Range(0, 8).Select(k => 200.0 * k).ToArray();
        var g = Enumerable.Range(1, 8).Select(k => (double)k).ToArray();
        var states = StateSpaceBuilder.Build(TestDecks.Create(Coordinates(8), energies, TestDecks.Weights(g), TestDecks.NoCoupling));

        Assert.All(states.LogEquilibrium, v => Assert.True(double.IsFinite(v)));
        for (var i = 0; i < 8; i++)
        {
            for (var j = 0; j < 8; j++)
            {
                var expected = Math.Log(g[j] / g[i]) - (energies[j] - energies[i]);
                Assert.Equal(expected, states.LogEquilibrium[j] - states.LogEquilibrium[i], 1e-12 * Math.Max(1, Math.Abs(expected)));
            }
        }

        // Normalised: ln pi_1 = -ln(1 + 2 e^-200 + ...) rounds to 0; the deepest state is ln 8 - 1400 below it.
        Assert.Equal(0.0, states.LogEquilibrium[0], 1e-15);
        Assert.Equal(Math.Log(8) - 1400, states.LogEquilibrium[7], 1e-12 * 1400);
        var populations = states.EquilibriumPopulations();
        Assert.All(populations, p => Assert.True(double.IsFinite(p) && p >= 0));
        Assert.Equal(1.0, populations[0], 1e-15);
        Assert.Equal(0.0, populations[7]);
    }

    [Fact]
    public void NonPositiveWeight_IsRejectedAtTheWeightsNamingTheState()
    {
        var deck = TestDecks.Create(Coordinates(3), [0, 1, 2], TestDecks.Weights(1, 0, 2), TestDecks.NoCoupling);
        var error = Assert.Throws<DeckException>(() => StateSpaceBuilder.Build(deck));
        Assert.Equal(TestDecks.At(4), error.Span);
        Assert.Contains("'s2'", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void WrongNumberOfEnergies_IsRejectedAtTheEnergies()
    {
        var deck = TestDecks.Create(Coordinates(3), [0, 1], TestDecks.Weights(1, 1, 1), TestDecks.NoCoupling);
        var error = Assert.Throws<DeckException>(() => StateSpaceBuilder.Build(deck));
        Assert.Equal(TestDecks.At(3), error.Span);
        Assert.Contains("3 states", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void NonFiniteEnergy_IsRejectedNamingTheState()
    {
        var deck = TestDecks.Create(Coordinates(2), [0, double.NaN], TestDecks.Weights(1, 1), TestDecks.NoCoupling);
        var error = Assert.Throws<DeckException>(() => StateSpaceBuilder.Build(deck));
        Assert.Equal(TestDecks.At(3), error.Span);
        Assert.Contains("'s2'", error.Problem, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(-1.0)]
    [InlineData(double.PositiveInfinity)]
    public void NonPositiveKT_IsRejectedAtKT(double kT)
    {
        var deck = TestDecks.Create(Coordinates(2), [0, 1], TestDecks.Weights(1, 1), TestDecks.NoCoupling, kT: kT);
        Assert.Equal(TestDecks.At(8), Assert.Throws<DeckException>(() => StateSpaceBuilder.Build(deck)).Span);
    }

    [Fact]
    public void ThreeDimensionalMeasure_WithZeroRadius_IsRejectedNamingTheState()
    {
        var deck = TestDecks.Create([0.0, 1.0], [0, 0], new IsotropicWeights(3, TestDecks.At(4)), TestDecks.NoCoupling);
        var error = Assert.Throws<DeckException>(() => StateSpaceBuilder.Build(deck));
        Assert.Equal(TestDecks.At(4), error.Span);
        Assert.Contains("'s1'", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void OneDimensionalMeasure_AcceptsZeroCoordinate()
    {
        var deck = TestDecks.Create([0.0, 1.0], [0, 0], new IsotropicWeights(1, TestDecks.At(4)), TestDecks.NoCoupling);
        var states = StateSpaceBuilder.Build(deck);
        Assert.Equal(Math.Log(2), states.LogWeights[0], 1e-15);
        Assert.Equal(Math.Log(0.5), states.LogEquilibrium[0], 1e-15);
    }

    [Fact]
    public void MechanicsWeights_WithoutTheMechanicsStage_AreRefusedAtTheirSpan()
    {
        var withoutLagrangian = TestDecks.Create(Coordinates(2), [1, 2], new MechanicsWeights(TestDecks.At(4)), TestDecks.NoCoupling);
        var deck = withoutLagrangian with { Mechanics = new MechanicsSpec("v^2/2 - q^2/2", 1.0, TestDecks.At(11)) };
        var error = Assert.Throws<DeckException>(() => StateSpaceBuilder.Build(deck, null));
        Assert.Equal(TestDecks.At(4), error.Span);
        Assert.Contains("mechanics stage", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void MechanicsWeights_WithoutALagrangian_AreRefusedAtTheirSpan()
    {
        var deck = TestDecks.Create(Coordinates(2), [1, 2], new MechanicsWeights(TestDecks.At(4)), TestDecks.NoCoupling);
        var error = Assert.Throws<DeckException>(() => StateSpaceBuilder.Build(deck, (_, e, _) => new MechanicsResult(e, e, e, e, e, e)));
        Assert.Contains("Lagrangian", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void ParameterNamedLikeAStateVariable_IsRejectedAtTheParameter()
    {
        var shadowing = new DeckParameter("x", 2.0, TestDecks.At(12));
        var givenEnergies = TestDecks.Create(Coordinates(2), [0, 1], TestDecks.Weights(1, 1), TestDecks.NoCoupling, parameters: shadowing);
        var deck = givenEnergies with { Energies = new PerStateExpression("x", TestDecks.At(3, 12)) };
        var error = Assert.Throws<DeckException>(() => StateSpaceBuilder.Build(deck));
        Assert.Equal(TestDecks.At(12), error.Span);
    }

    private static double[] Coordinates(int n) => Enumerable.Range(1, n).Select(k => (double)k).ToArray();

    private static void AssertBoltzmannPopulations(double[] energies, double[] g, double kT)
    {
        var deck = TestDecks.Create(Coordinates(energies.Length), energies, TestDecks.Weights(g), TestDecks.NoCoupling, kT, EnergyUnit.Wavenumber);
        var states = StateSpaceBuilder.Build(deck);

        // Independent closed form, formed directly (these factors are all within double range).
        var factors = energies.Select((e, k) => g[k] * Math.Exp(-e / kT)).ToArray();
        var partition = factors.Sum();
        var populations = states.EquilibriumPopulations();
        for (var i = 0; i < energies.Length; i++)
        {
            Assert.Equal(factors[i] / partition, populations[i], factors[i] / partition * 1e-13);
            for (var j = 0; j < energies.Length; j++)
            {
                var ratio = g[j] / g[i] * Math.Exp(-(energies[j] - energies[i]) / kT);
                Assert.Equal(Math.Log(ratio), states.LogEquilibrium[j] - states.LogEquilibrium[i], 1e-12 * Math.Max(1, Math.Abs(Math.Log(ratio))));
            }
        }
    }
}
