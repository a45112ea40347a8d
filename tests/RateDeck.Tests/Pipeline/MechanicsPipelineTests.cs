using RateDeck.LinearAlgebra;
using RateDeck.Mechanics;
using RateDeck.Pipeline;
using RateDeck.Tests.Decks;
using RateDeck.Tests.Mechanics;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Pipeline;

/// <summary>
/// Decks with a [mechanics] Lagrangian through the whole pipeline (file -> reader -> state space
/// with the real mechanics stage -> rate matrix): the weights are g(E) = T(E) / h, the derived
/// actions and periods are kept for the outputs, and a Lagrangian without a closed orbit at a
/// state energy is a deck error at the Lagrangian naming the state.
/// </summary>
public sealed class MechanicsPipelineTests : IDisposable
{
    private readonly TempFolder _folder = new();
    private readonly DeckScratch _scratch = new();

    public void Dispose()
    {
        _folder.Dispose();
        _scratch.Dispose();
    }

    // Oscillator L = m v^2/2 - m w^2 q^2/2: T = 2 pi / w at every energy and J = 2 pi E / w
    // (Landau and Lifshitz, Mechanics, sections 21 and 49, from memory), so g = T / h = 2 pi / (w h),
    // one state per h w of energy, the spacing of the oscillator's levels (textbook quantum mechanics).
    [Fact]
    public void HarmonicOscillatorDeck_GivesWeightTwoPiOverOmegaH_ForEveryState()
    {
        const double omega = 2.3;
        const double planck = 0.05;
        var loaded = Load(OscillatorDeck("energy = \"none\"", "kT = 0.8", "m = 1.7\nw = 2.3", "from = 0.1\nto = 5.0", "planck = 0.05"));

        var g = 2 * Math.PI / (omega * planck);
        var mechanics = Assert.IsType<MechanicsResult>(loaded.Mechanics);
        for (var i = 0; i < loaded.States.Count; i++)
        {
            var energy = loaded.States.Energies[i];
            MechanicsAssert.Relative(g, Math.Exp(loaded.States.LogWeights[i]), 1e-12);
            MechanicsAssert.Relative(g, mechanics.Weights[i], 1e-12);
            MechanicsAssert.Relative(2 * Math.PI * energy / omega, mechanics.Actions[i], 1e-12);
            MechanicsAssert.Relative(2 * Math.PI / omega, mechanics.Periods[i], 1e-12);

            // Equal weights: pi_i / pi_1 is the bare Boltzmann factor (SPEC 2).
            var expected = -(energy - loaded.States.Energies[0]) / 0.8;
            Assert.Equal(expected, loaded.States.LogEquilibrium[i] - loaded.States.LogEquilibrium[0], 1e-12);
        }

        Assert.Equal(12, loaded.Rates.Count);
    }

    // The same oscillator in eV and seconds, with h left to its default: the exact SI defining
    // constants (CODATA 2018) h = 6.62607015e-34 J s and e = 1.602176634e-19 C give h in eV s. A vibration of
    // w = 5e13 rad/s has g = 2 pi / (w h), about 30 states per eV.
    [Fact]
    public void HarmonicOscillatorInElectronvolts_UsesTheCodataPlanckConstantByDefault()
    {
        const double omega = 5.0e13;
        var loaded = Load(OscillatorDeck("energy = \"eV\"", "kelvin = 300.0", "m = 2.4e-28\nw = 5.0e13", "from = 0.01\nto = 0.3", ""));

        var g = 2 * Math.PI / (omega * (6.62607015e-34 / 1.602176634e-19));
        Assert.All(loaded.States.LogWeights, logWeight => MechanicsAssert.Relative(g, Math.Exp(logWeight), 1e-12));
    }

    // Plane pendulum L = m l^2 v^2/2 - m g l (1 - cos q) with k^2 = E / (2 m g l): T = 4 K(k) / w0,
    // w0 = sqrt(g / l) (Landau and Lifshitz, Mechanics, section 11, problem 1, from memory), with
    // K by the arithmetic-geometric mean (Abramowitz and Stegun 17.6), checked against SciPy in the
    // mechanics tests. The demo deck's 40 grains reach 95 % of the separatrix energy.
    [Fact]
    public void PendulumDemoDeck_WeightsAreFourKOverOmegaH()
    {
        var loaded = DeckPipeline.Load(DemoPath("pendulum-ladder.toml"), [], new ManagedLinearAlgebra());

        var planck = loaded.Deck.Mechanics!.Planck;
        Assert.Equal(40, loaded.States.Count);
        for (var i = 0; i < loaded.States.Count; i++)
        {
            var m = loaded.States.Energies[i] / 2.0; // 2 m g0 len = 2 in the demo
            var period = 4 * EllipticIntegrals.K(m); // w0 = sqrt(g0 / len) = 1 in the demo
            MechanicsAssert.Relative(period / planck, Math.Exp(loaded.States.LogWeights[i]), 1e-10);
        }
    }

    [Fact]
    public void EnergyAboveTheSeparatrix_IsADeckErrorAtTheLagrangianNamingTheState()
    {
        var deck = OscillatorDeck("energy = \"none\"", "kT = 0.5", "m = 1.0", "from = 0.5\nto = 2.5", "planck = 0.1")
            .Replace("lagrangian = \"0.5*m*v^2 - 0.5*m*w^2*q^2\"", "lagrangian = \"§0.5*m*v^2 - m*(1 - cos(q))\"", StringComparison.Ordinal);

        // Grid 0.5 .. 2.5 in 11 steps of 2/11: state 10 at 2.136 is the first above 2, the top of the pendulum.
        var error = StageErrors.FailAt(_scratch, deck, d => DeckPipeline.Assemble(d, new ManagedLinearAlgebra()));
        Assert.Contains("state 's10' (state 10)", error.Problem, StringComparison.Ordinal);
        Assert.Contains("separatrix", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void DeckWithALagrangianButItsOwnWeights_KeepsItsWeightsAndStillShowsTheMechanics()
    {
        var text = OscillatorDeck("energy = \"none\"", "kT = 0.8", "m = 1.7\nw = 2.3", "from = 0.1\nto = 5.0", "planck = 0.05")
            .Replace("from_mechanics = true", "expression = \"1 + i\"", StringComparison.Ordinal);
        var loaded = Load(text);

        Assert.Equal(Math.Log(13), loaded.States.LogWeights[^1]);
        MechanicsAssert.Relative(2 * Math.PI / (2.3 * 0.05), Assert.IsType<MechanicsResult>(loaded.Mechanics).Weights[^1], 1e-12);
    }

    [Fact]
    public void DeckWithoutALagrangian_HasNoMechanics()
    {
        var loaded = DeckPipeline.Load(DemoPath("three-level.toml"), [], new ManagedLinearAlgebra());
        Assert.Null(loaded.Mechanics);
    }

    private static string DemoPath(string demo) => Path.Combine(AppContext.BaseDirectory, "decks", demo);

    private LoadedDeck Load(string text)
    {
        var path = _folder.File("oscillator.toml");
        File.WriteAllText(path, text);
        return DeckPipeline.Load(path, [], new ManagedLinearAlgebra());
    }

    /// <summary>Twelve states on a linear energy grid, weights from the oscillator Lagrangian, a neighbour kernel.</summary>
    private static string OscillatorDeck(string units, string temperature, string parameters, string range, string planck) => $"""
        format = 1
        title = "oscillator"
        [units]
        {units}
        [temperature]
        {temperature}
        [parameters]
        {parameters}
        [states]
        spacing = "linear"
        count = 12
        {range}
        [energies]
        expression = "x"
        [weights]
        from_mechanics = true
        [mechanics]
        lagrangian = "0.5*m*v^2 - 0.5*m*w^2*q^2"
        {planck}
        [transfer]
        kind = "kernel"
        direction = "toward_smaller"
        kernel = "exp(-(x - y))"
        band = 1
        [run]
        t_end = 1.0
        """;
}
