using RateDeck.Decks;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary>The demo decks in decks/ (copied next to the test assembly) read without errors.</summary>
public sealed class DemoDeckTests
{
    private static Deck Demo(string name) => DeckReader.Read(Path.Combine(AppContext.BaseDirectory, "decks", name), []);

    [Fact]
    public void TwoLevelDemo_Parses()
    {
        var deck = Demo("two-level.toml");
        Assert.Equal(["ground", "upper"], deck.Grid.Labels);
        var coupling = Assert.IsType<MeasuredOneWay>(deck.Coupling);
        Assert.Equal(new[] { (1, 0, 2.0e3) }, coupling.Entries.Select(e => (e.From, e.To, e.Rate)));
        Assert.Equal(1, Assert.IsType<InitialInState>(deck.Initial).State);
    }

    [Fact]
    public void ThreeLevelDemo_ConvertsItsKelvinTemperature()
    {
        var deck = Demo("three-level.toml");
        Assert.Equal(EnergyUnit.Wavenumber, deck.EnergyUnit);
        // CODATA 2018 second radiation constant c2 = 1.438776877 cm K: kT = 600 K / c2 in cm^-1.
        Assert.Equal(600.0 / 1.438776877, deck.KT, 1e-6);
        Assert.Equal(3, Assert.IsType<MeasuredOneWay>(deck.Coupling).Entries.Count);
        Assert.Equal(OutputSpacing.Logarithmic, deck.Run.Spacing);
        Assert.Equal(ExplicitMethod.Euler, deck.Run.Method);
    }

    [Fact]
    public void CascadeDemo_IsAPumpedCascadeWithSinksAtBothEnds()
    {
        var deck = Demo("cascade.toml");
        Assert.Equal(48, deck.Grid.Count);
        Assert.Equal("k24", deck.Grid.Labels[23]);
        Assert.Equal(1000.0, deck.Grid.Coordinates[^1]);
        Assert.Equal(3, Assert.IsType<IsotropicWeights>(deck.Weights).Dimension);
        Assert.Equal("beta * x^2", Assert.IsType<PerStateExpression>(deck.Energies).Text);
        var coupling = Assert.IsType<MeasuredOneWay>(deck.Coupling);
        Assert.Equal(TransferDirection.TowardLarger, coupling.Direction);
        // Nearest and next-nearest neighbours: 47 + 46 pairs, all downscale.
        Assert.Equal(93, coupling.Entries.Count);
        Assert.All(coupling.Entries, e => Assert.InRange(e.To - e.From, 1, 2));
        var pumping = Assert.IsType<PerStateValues>(deck.Pumping);
        Assert.Equal(23, Array.FindIndex(pumping.Values, v => v > 0));
        var losses = Assert.IsType<PerStateValues>(deck.Losses);
        Assert.True(losses.Values[0] > 0 && losses.Values[^1] > 0);
        Assert.Equal(100.0, deck.Run.EndTime);
    }
}
