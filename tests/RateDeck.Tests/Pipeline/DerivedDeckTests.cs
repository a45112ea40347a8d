using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Tests.Decks;
using RateDeck.Tests.Support;
using Xunit;
using static RateDeck.Tests.Mechanics.EllipticIntegrals;
using static RateDeck.Tests.Mechanics.MechanicsAssert;

namespace RateDeck.Tests.Pipeline;

/// <summary>
/// Decks derived in memory by typed overrides (<see cref="Deck.With"/>, <see cref="LoadedDeck.With"/>):
/// the new values reach every stage, they are validated like the deck, recorded in the provenance,
/// and nothing is read or derived again that does not depend on them.
/// </summary>
public sealed class DerivedDeckTests : IDisposable
{
    private readonly DeckScratch _scratch = new();

    public void Dispose() => _scratch.Dispose();

    private static string DemoPath(string demo) => Path.Combine(AppContext.BaseDirectory, "decks", demo);

    // Boltzmann: pi_i / pi_j = (g_i / g_j) exp(-(E_i - E_j) / kT) (common practice).
    [Fact]
    public void TypedKT_GivesTheBoltzmannEquilibriumOfTheNewTemperature_AndIsRecorded()
    {
        var loaded = DeckPipeline.Load(DemoPath("three-level.toml"), [], new ManagedLinearAlgebra());
        var derived = loaded.With(DeckOverride.KT(300.0));

        Assert.Equal(300.0, derived.Deck.KT);
        Assert.Equal(["temperature.kT=300"], derived.Deck.Overrides);
        double[] energies = [0.0, 450.0, 1200.0];
        double[] degeneracies = [1, 3, 5];
        for (var i = 1; i < 3; i++)
        {
            var expected = Math.Log(degeneracies[i] / degeneracies[0]) - (energies[i] - energies[0]) / 300.0;
            Assert.Equal(expected, derived.States.LogEquilibrium[i] - derived.States.LogEquilibrium[0], 1e-12);
        }

        // Detailed balance of the completed rates at the new kT: K_lu / K_ul = pi_l / pi_u.
        var k = derived.Rates.Generator;
        var ratio = k[2, 0] / k[0, 2];
        Assert.Equal(5.0 * Math.Exp(-1200.0 / 300.0), ratio, 1e-12 * ratio);
    }

    // Plane pendulum: T = 4 K(m) / w0 with m = E / (2 m g0 len), w0 = sqrt(g0 / len) (Landau and
    // Lifshitz, Mechanics, section 11, problem 1, from memory); K by the arithmetic-geometric mean
    // (Abramowitz and Stegun 17.6), checked against SciPy in the mechanics tests.
    [Fact]
    public void PendulumWithANewKT_KeepsItsMechanics_AndWithANewG0_DerivesItAgain()
    {
        var loaded = DeckPipeline.Load(DemoPath("pendulum-ladder.toml"), [], new ManagedLinearAlgebra());

        var warmer = loaded.With(DeckOverride.KT(0.6));
        Assert.Same(loaded.Mechanics, warmer.Mechanics);
        Assert.NotEqual(loaded.States.LogEquilibrium, warmer.States.LogEquilibrium);

        // g0 = 4: the separatrix moves to 2 m g0 len = 8, so all 40 grains (E <= 1.9) stay trapped.
        var stiffer = loaded.With(DeckOverride.Parameter("g0", 4.0));
        Assert.NotSame(loaded.Mechanics, stiffer.Mechanics);
        var planck = stiffer.Deck.Mechanics!.Planck;
        for (var i = 0; i < stiffer.States.Count; i++)
        {
            var period = 4 * K(stiffer.States.Energies[i] / 8.0) / 2.0;
            Relative(period / planck, Math.Exp(stiffer.States.LogWeights[i]), 1e-10);
        }
    }

    [Fact]
    public void DerivedDeck_DoesNotReadTheRateFileAgain()
    {
        var deck = _scratch.Parse(DeckScratch.Valid());
        File.Delete(Path.Combine(_scratch.Directory, "rates.csv"));

        var loaded = DeckPipeline.Assemble(deck.With(DeckOverride.KT(0.25)), new ManagedLinearAlgebra());

        // rates.csv: b -> a at 1.0, c -> b at 2.0, c -> a at 0.5 (K[to, from]).
        Assert.Equal(1.0, loaded.Rates.Generator[0, 1]);
        Assert.Equal(2.0, loaded.Rates.Generator[1, 2]);
        Assert.Equal(0.5, loaded.Rates.Generator[0, 2]);
    }

    [Fact]
    public void TypedRatesAndPopulations_ReachTheGeneratorAndTheStart()
    {
        var deck = _scratch.Parse(DeckScratch.Valid())
            .With(DeckOverride.Set("losses.by_state.b", 0.5), DeckOverride.Set("initial.values", [0.2, 0.3, 0.5]));
        var loaded = DeckPipeline.Assemble(deck, new ManagedLinearAlgebra());

        Assert.Equal(["losses.by_state.b=0.5", "initial.values=[0.2, 0.3, 0.5]"], deck.Overrides);
        Assert.Equal([0.2, 0.3, 0.5], RunSetup.InitialPopulations(deck, loaded.States));

        // Conservation with a sink (SPEC 2): each column of K sums to minus that state's loss.
        double[] losses = [0.0, 0.5, 0.0];
        for (var column = 0; column < 3; column++)
        {
            var sum = Enumerable.Range(0, 3).Sum(row => loaded.Rates.Generator[row, column]);
            Assert.Equal(-losses[column], sum, 1e-14);
        }
    }

    [Fact]
    public void InvalidTypedOverrides_AreReportedAtTheOverrideLikeTheDeckWould()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(extra: "[parameters]\nalpha = 0.25"));

        var negative = Assert.Throws<DeckException>(() => deck.With(DeckOverride.KT(-1)));
        Assert.Equal(SourceSpan.None("--set temperature.kT=-1"), negative.Span);
        Assert.Equal("`temperature.kT` must be > 0, not -1", negative.Problem);

        var unknown = Assert.Throws<DeckException>(() => deck.With(DeckOverride.Parameter("alpah", 1)));
        Assert.Contains("Did you mean `alpha`?", unknown.Problem, StringComparison.Ordinal);

        var fractional = Assert.Throws<DeckException>(() => deck.With(DeckOverride.Set("run.outputs", 2.5)));
        Assert.Contains("must be a whole number", fractional.Problem, StringComparison.Ordinal);

        var notFinite = Assert.Throws<DeckException>(() => deck.With(DeckOverride.Parameter("alpha", double.NaN)));
        Assert.Equal(SourceSpan.None("--set parameters.alpha=nan"), notFinite.Span);
    }

    [Fact]
    public void DerivingLeavesTheBaseDeckAsItWas_AndOverridesAccumulateInOrder()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(), "run.t_end=2");
        var derived = deck.With(DeckOverride.KT(0.1)).With(DeckOverride.Set("run.explicit", "euler"));

        Assert.Equal(0.5, deck.KT);
        Assert.Equal(ExplicitMethod.RungeKutta4, deck.Run.Method);
        Assert.Equal(["run.t_end=2", "temperature.kT=0.1", "run.explicit=\"euler\""], derived.Overrides);
        Assert.Equal((0.1, 2.0, ExplicitMethod.Euler), (derived.KT, derived.Run.EndTime, derived.Run.Method));
    }

    [Fact]
    public void StageInputs_NameWhatEachExpressionReads()
    {
        var deck = DeckReader.Read(DemoPath("pendulum-ladder.toml"), []);
        var inputs = StageInputs.ReadBy(deck);

        Assert.Equal(["g0", "len", "m"], inputs["mechanics"]);
        Assert.Equal(["alpha", "z"], inputs["transfer"]);
        Assert.Empty(inputs["energies"]);
        Assert.Equal(["de", "g0", "k_esc", "len", "m"], inputs["losses"]);
        Assert.False(inputs.ContainsKey("weights"));
    }

    [Fact]
    public void DeckBuiltInCode_HasNoFileToApplyOverridesTo()
        => Assert.Throws<InvalidOperationException>(
            () => TestDecks.Create([1.0, 2.0], [0, 1], TestDecks.Weights(1, 1), TestDecks.NoCoupling).With(DeckOverride.KT(2)));
}
