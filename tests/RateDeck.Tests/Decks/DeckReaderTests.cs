using System.Security.Cryptography;
using RateDeck.Decks;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary>What a valid deck turns into: grids, defaults, expression spans, hashes and paths.</summary>
public sealed class DeckReaderTests : IDisposable
{
    private readonly DeckScratch _scratch = new();

    private const string _kernel = "kind = \"kernel\"\nkernel = \"1\"\ndirection = \"toward_larger\"";

    public void Dispose() => _scratch.Dispose();

    [Fact]
    public void ExplicitStates_GetHalfNeighbourDistanceCellsWithMirroredEnds()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 4.0, 8.0]", energies: "expression = \"x\"", weights: "values = [1, 1, 1, 1]", transfer: _kernel));
        Assert.Equal(["s1", "s2", "s3", "s4"], deck.Grid.Labels);
        // (x2 - x1), (x3 - x1)/2, (x4 - x2)/2, (x4 - x3): the deck-format definition.
        Assert.Equal([1.0, 1.5, 3.0, 4.0], deck.Grid.CellWidths);
        Assert.Equal(new SourceSpan(_scratch.DeckPath, 7, 2), deck.Grid.Span);
    }

    [Fact]
    public void LinearGrid_IncludesBothEndsWithUniformCells()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(states: "spacing = \"linear\"\ncount = 5\nfrom = 0.0\nto = 2.0", energies: "expression = \"x\"", weights: "expression = \"1\"", transfer: _kernel));
        Assert.Equal([0.0, 0.5, 1.0, 1.5, 2.0], deck.Grid.Coordinates);
        Assert.All(deck.Grid.CellWidths, w => Assert.Equal(0.5, w, 1e-15));
    }

    [Fact]
    public void LogGrid_IsGeometricWithCellsXTimesDLogX()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(states: "spacing = \"log\"\ncount = 4\nfrom = 1.0\nto = 1000.0\nlabel_prefix = \"k\"", energies: "expression = \"x\"", weights: "isotropic_dimension = 3", transfer: _kernel));
        Assert.Equal(["k1", "k2", "k3", "k4"], deck.Grid.Labels);
        var expected = new[] { 1.0, 10.0, 100.0, 1000.0 };
        var dLog = Math.Log(10.0);
        for (var k = 0; k < 4; k++)
        {
            Assert.Equal(expected[k], deck.Grid.Coordinates[k], 1e-12 * expected[k]);
            Assert.Equal(expected[k] * dLog, deck.Grid.CellWidths[k], 1e-12 * expected[k]);
        }

        Assert.Equal(3, Assert.IsType<IsotropicWeights>(deck.Weights).Dimension);
    }

    [Fact]
    public void Defaults_AreFilledIn()
    {
        var text = DeckScratch.Valid(units: "", weights: "values = [1, 1, 1]").Replace("[weights]\nvalues = [1, 1, 1]\n", "");
        var deck = _scratch.Parse(text);
        Assert.Equal(EnergyUnit.Dimensionless, deck.EnergyUnit);
        Assert.Equal("s", deck.TimeUnit);
        Assert.Equal([1.0, 1.0, 1.0], Assert.IsType<PerStateValues>(Assert.IsType<GivenWeights>(deck.Weights).Source).Values);
        Assert.IsType<InitialEquilibrium>(deck.Initial);
        Assert.Null(deck.Losses);
        Assert.Null(deck.Pumping);
        Assert.Null(deck.Mechanics);
        Assert.Equal(new RunSpec(1.0, 50, OutputSpacing.Linear, null, ExplicitMethod.RungeKutta4, null, 0.5, [], deck.Run.Span), deck.Run with { PlotStates = [] });
        Assert.Empty(deck.Run.PlotStates);
    }

    [Fact]
    public void LogOutputs_DefaultTheFirstTimeToTEndTimes1e4()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(run: "t_end = 20.0\nspacing = \"log\""));
        Assert.Equal(OutputSpacing.Logarithmic, deck.Run.Spacing);
        Assert.Equal(20.0 * 1e-4, deck.Run.FirstTime!.Value, 1e-18);
    }

    [Fact]
    public void ExpressionSpan_PointsInsideTheQuotes()
    {
        var text = DeckScratch.Valid(energies: "expression = \"§0.5 * x^2\"");
        var (plain, line, column) = DeckScratch.Unmark(text);
        var energies = Assert.IsType<PerStateExpression>(_scratch.Parse(plain).Energies);
        Assert.Equal("0.5 * x^2", energies.Text);
        Assert.Equal(new SourceSpan(_scratch.DeckPath, line, column), energies.Span);
        Assert.Equal(15, column);
    }

    [Fact]
    public void LiteralAndMultiLineExpressionSpans_PointAtTheirFirstCharacter()
    {
        var text = DeckScratch.Valid(
            energies: "expression = '§x + 1'",
            transfer: "kind = \"kernel\"\nkernel = \"\"\"\n§exp(-(y - x)) * alpha\"\"\"\ndirection = \"toward_larger\"\nband = 1",
            extra: "[parameters]\nalpha = 2");
        var (plain, places) = DeckScratch.UnmarkAll(text);
        var deck = _scratch.Parse(plain);
        var ((line1, column1), (line2, column2)) = (places[0], places[1]);
        Assert.Equal(new SourceSpan(_scratch.DeckPath, line1, column1), deck.Energies.Span);
        var kernel = Assert.IsType<KernelModel>(deck.Coupling);
        Assert.Equal("exp(-(y - x)) * alpha", kernel.Text);
        Assert.Equal(new SourceSpan(_scratch.DeckPath, line2, column2), kernel.Span);
        Assert.Equal(1, column2);
        Assert.Equal((TransferDirection.TowardLarger, 1), (kernel.Direction, kernel.Band));
    }

    [Fact]
    public void ByStatePumping_FillsOneValuePerState()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(extra: "[pumping]\nby_state = { c = 2.5, 1 = 0.5 }"));
        Assert.Equal([0.5, 0.0, 2.5], Assert.IsType<PerStateValues>(deck.Pumping).Values);
    }

    [Fact]
    public void KelvinTemperature_IsConvertedToTheEnergyUnit()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(units: "energy = \"eV\"", temperature: "kelvin = 11604.51812"));
        // CODATA 2018: 1 eV = 11604.51812 K, so this temperature is kT = 1 eV (to the table's 10 digits).
        Assert.Equal(1.0, deck.KT, 1e-9);
    }

    [Fact]
    public void MechanicsPlanck_DefaultsToHInTheDeckUnitsTimesSeconds()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(extra: "[mechanics]\nlagrangian = \"0.5*m*v^2 - 0.5*m*w^2*q^2\""));
        // CODATA 2018: h = 4.135667696e-15 eV s.
        Assert.Equal(4.135667696e-15, deck.Mechanics!.Planck, 1e-24);
        Assert.Equal("0.5*m*v^2 - 0.5*m*w^2*q^2", deck.Mechanics.Lagrangian);
    }

    [Fact]
    public void WeightsFromMechanics_AreAccepted()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(units: "energy = \"none\"", weights: "from_mechanics = true", extra: "[mechanics]\nlagrangian = \"0.5*v^2\"\nplanck = 6.283"));
        Assert.IsType<MechanicsWeights>(deck.Weights);
        Assert.Equal(6.283, deck.Mechanics!.Planck);
    }

    [Fact]
    public void Read_HashesTheFileBytesAndResolvesCsvAgainstTheDeckFolder()
    {
        var sub = Path.Combine(_scratch.Directory, "sub");
        Directory.CreateDirectory(sub);
        File.WriteAllText(Path.Combine(sub, "rates.csv"), DeckScratch.Rates);
        var path = Path.Combine(sub, "deck.toml");
        File.WriteAllText(path, "\uFEFF" + DeckScratch.Valid());
        var deck = DeckReader.Read(path, []);
        // SHA-256 of the bytes as stored, byte order mark included (common practice for content hashes).
        Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(path))), deck.Sha256);
        Assert.Equal(path, deck.SourcePath);
        Assert.Equal(Path.Combine(sub, "rates.csv"), Assert.IsType<MeasuredOneWay>(deck.Coupling).Entries[0].Span.File);
        Assert.Equal("test deck", deck.Title);
        Assert.Empty(deck.Overrides);
    }

    [Fact]
    public void MissingTitle_DefaultsToTheFileName()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(top: "format = 1"));
        Assert.Equal("deck", deck.Title);
    }

    [Fact]
    public void DottedKeys_AreTheSameAsTables()
    {
        var text = DeckScratch.Valid(top: "format = 1\ntemperature.kT = 0.25", run: "t_end = 1.0\nplot_states = [\"b\"]").Replace("[temperature]\nkT = 0.5\n", "");
        var deck = _scratch.Parse(text);
        Assert.Equal(0.25, deck.KT);
        Assert.Equal([1], deck.Run.PlotStates);
    }
}
