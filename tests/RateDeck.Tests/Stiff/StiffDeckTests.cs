using System.Text.Json;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Propagation;
using RateDeck.Tests.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Stiff;

/// <summary>
/// The two stiff decks of docs/stiff-decks.md (decks/stiff-three.toml, decks/stiff-six.toml,
/// written from docs/deck-format.md) against mpmath's expm at 90 digits (tests/reference/
/// make_stiff_fixtures.py, mpmath 1.2.1): every population above 1e-12 of the total to 1e-8
/// relative, and the decay rates to 1e-8 relative.
/// </summary>
public class StiffDeckTests
{
    public static TheoryData<string> Decks => new() { "stiff-three", "stiff-six" };

    /// <summary>The stiff fixtures and the slow-mode fixtures (SlowModeTests) record the mpmath that made them.</summary>
    [Theory]
    [InlineData("stiff.json", "1.2.1")]
    [InlineData("slow_modes.json", "1.3.0")]
    public void Fixture_RecordsTheMpmathVersion(string file, string version)
    {
        using var document = JsonDocument.Parse(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "fixtures", file)));
        Assert.Equal("mpmath", document.RootElement.GetProperty("library").GetString());
        Assert.Equal(version, document.RootElement.GetProperty("mpmath").GetString());
    }

    [Theory]
    [MemberData(nameof(Decks))]
    public void AutomaticExactPath_MatchesMpmathToOneInTenToTheEight(string deck)
    {
        var (loaded, fixture) = Load(deck);
        var spectrum = Spectrum.Compute(loaded.Rates, loaded.Algebra);
        var initial = RunSetup.InitialPopulations(loaded.Deck, loaded.States);
        var propagator = ExactPropagatorChoice.Choose(loaded.Rates, loaded.Algebra, null, initial, spectrum, loaded.Deck.Run.EndTime);

        var trajectory = propagator.Propagate(initial, [0, .. fixture.Times]);

        Assert.Equal("extended-eigen", propagator.Name);
        var (worst, where) = StiffFixture.WorstRelative(fixture.Populations, trajectory.Populations[1..]);
        Assert.True(worst <= 1e-8, $"{deck}: worst relative difference {worst:G3} at {where}");
    }

    [Theory]
    [MemberData(nameof(Decks))]
    public void ImplicitIntegrator_MatchesMpmathToOneInTenToTheEight(string deck)
    {
        var (loaded, fixture) = Load(deck);
        var initial = RunSetup.InitialPopulations(loaded.Deck, loaded.States);

        var trajectory = new ImplicitSdirkPropagator(loaded.Rates).Propagate(initial, [0, .. fixture.Times]);

        var (worst, where) = StiffFixture.WorstRelative(fixture.Populations, trajectory.Populations[1..]);
        Assert.True(worst <= 1e-8, $"{deck}: worst relative difference {worst:G3} at {where}");
    }

    [Theory]
    [MemberData(nameof(Decks))]
    public void Spectrum_CountsOneNullModeAndResolvesEverySlowRate(string deck)
    {
        var (loaded, fixture) = Load(deck);

        var spectrum = Spectrum.Compute(loaded.Rates, loaded.Algebra);

        Assert.True(spectrum.IsResolved, spectrum.Unresolved);
        Assert.Equal(1, spectrum.StructuralNullDimension);
        Assert.Equal(1, spectrum.NullDimension);
        var rates = spectrum.Eigenvalues.Select(v => -v).OrderBy(r => r).ToArray();
        for (var m = 1; m < rates.Length; m++)
        {
            Assert.True(Math.Abs(rates[m] - fixture.DecayRates[m]) <= 1e-8 * fixture.DecayRates[m], $"{deck} mode {m}: {rates[m]:R} against {fixture.DecayRates[m]:R}");
        }

        Assert.Equal(fixture.DecayRates[1], spectrum.SlowestRate!.Value, fixture.DecayRates[1] * 1e-8);
    }

    [Trait("Through", "program")]
    [Fact]
    public void DefaultRun_DeclinesTheExplicitMethodAndWritesTheMpmathPopulations()
    {
        using var folder = new TempFolder();
        var fixture = StiffFixture.Case("stiff-three");

        var (code, output, error) = CliRunner.Run("run", CliRunner.DemoDeck("stiff-three.toml"), "--out", folder.Path, "--no-plots");

        Assert.True(code == 0, error);
        Assert.Contains("explicit     declined: rk4", output);
        Assert.Contains("above the budget of 1e7 explicit steps", output);
        Assert.Contains("double-double", output);
        var last = File.ReadLines(folder.File("populations-exact.csv")).Last().Split(',').Skip(1).Select(v => double.Parse(v, System.Globalization.CultureInfo.InvariantCulture)).ToArray();
        var (worst, where) = StiffFixture.WorstRelative([fixture.Populations[^1]], [last]);
        Assert.True(worst <= 1e-8, $"t = 10: {worst:G3} at {where}");
    }

    [Trait("Through", "program")]
    [Fact]
    public void RunWithImplicit_ComparesAllThreePropagators()
    {
        using var folder = new TempFolder();

        var (code, output, error) = CliRunner.Run("run", CliRunner.DemoDeck("stiff-six.toml"), "--out", folder.Path, "--no-plots", "--implicit", "--json");

        Assert.True(code == 0, error);
        using var json = JsonDocument.Parse(output);
        Assert.Equal("extended-eigen", json.RootElement.GetProperty("propagator").GetString());
        Assert.StartsWith("declined", json.RootElement.GetProperty("explicit_declined").GetString());
        Assert.True(json.RootElement.GetProperty("implicit_vs_exact_max_rel_difference").GetDouble() < 1e-8);
    }

    [Trait("Through", "program")]
    [Fact]
    public void StiffnessWithAStep_StatesTheStepCountAndRefusesAboveTheBudget()
    {
        var (code, output, _) = CliRunner.Run("stiffness", CliRunner.DemoDeck("stiff-three.toml"), "--dt", "1e-7");

        Assert.Equal(3, code);
        Assert.Contains("needs 1e8 steps", output);
        Assert.Contains("ABOVE the budget of 1e7 explicit steps", output);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Stiffness_ReportsTheSlowRateOfMpmath()
    {
        var fixture = StiffFixture.Case("stiff-six");

        var (code, output, error) = CliRunner.Run("stiffness", CliRunner.DemoDeck("stiff-six.toml"), "--json");

        Assert.True(code == 0, error);
        using var json = JsonDocument.Parse(output);
        var slowest = json.RootElement.GetProperty("slowest_rate").GetDouble();
        Assert.Equal(fixture.DecayRates[1], slowest, fixture.DecayRates[1] * 1e-8);
        Assert.True(json.RootElement.GetProperty("slow_modes_resolved").GetBoolean());
    }

    private static (LoadedDeck Loaded, StiffFixture Fixture) Load(string deck) =>
        (DeckPipeline.Load(CliRunner.DemoDeck($"{deck}.toml"), [], LinearAlgebraProviders.Select(null, out _)), StiffFixture.Case(deck));
}
