using RateDeck.Cli;
using RateDeck.LinearAlgebra;
using RateDeck.Outputs;
using RateDeck.Pipeline;
using RateDeck.Tests.Cli;
using RateDeck.Tests.Decks;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Outputs;

/// <summary>Issue 8 sections 4 and 5: the plots of a run take their words and scales from the deck.</summary>
public sealed class RunPlotTests
{
    [Fact]
    public void StateAxisLabel_IsTheDecksCoordinateNameAndUnit()
    {
        using var scratch = new DeckScratch();

        var named = scratch.Parse(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"a\", \"b\", \"c\"]\ncoordinate_name = \"wave number k\"\ncoordinate_unit = \"1/nm\""));
        var nameOnly = scratch.Parse(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"a\", \"b\", \"c\"]\ncoordinate_name = \"level energy\""));
        var unnamed = scratch.Parse(DeckScratch.Valid(units: "energy = \"eV\"\ntime = \"ms\""));

        Assert.Equal("wave number k (1/nm)", RunPlots.StateAxisLabel(named.Plot));
        Assert.Equal("level energy", RunPlots.StateAxisLabel(nameOnly.Plot));
        Assert.Equal("state coordinate", RunPlots.StateAxisLabel(unnamed.Plot));
        Assert.Equal("time (ms)", RunPlots.TimeAxisLabel(unnamed));
    }

    [Fact]
    public void AxisScales_FollowTheGridsSpacing_AndThePlotKeysOverrideIt()
    {
        using var scratch = new DeckScratch();
        const string logStates = "spacing = \"log\"\ncount = 3\nfrom = 1.0\nto = 100.0\nlabels = [\"a\", \"b\", \"c\"]";
        const string linearStates = "spacing = \"linear\"\ncount = 3\nfrom = 1.0\nto = 100.0\nlabels = [\"a\", \"b\", \"c\"]";

        var logGrids = scratch.Parse(DeckScratch.Valid(states: logStates, run: "t_end = 1.0\nspacing = \"log\"\nt_first = 1e-3"));
        var linearGrids = scratch.Parse(DeckScratch.Valid(states: linearStates, run: "t_end = 1.0\nspacing = \"linear\""));
        var overridden = scratch.Parse(DeckScratch.Valid(states: logStates, run: "t_end = 1.0\nspacing = \"log\"",
            extra: "[plot]\ntime_axis = \"linear\"\nstate_axis = \"linear\""));
        var listed = scratch.Parse(DeckScratch.Valid(run: "t_end = 1.0\ntimes = [1e-3, 1e-2, 0.1]"));

        Assert.Equal((AxisScale.Log, AxisScale.Log), (RunPlots.TimeScale(logGrids), RunPlots.StateScale(logGrids)));
        Assert.Equal((AxisScale.Linear, AxisScale.Linear), (RunPlots.TimeScale(linearGrids), RunPlots.StateScale(linearGrids)));
        Assert.Equal((AxisScale.Linear, AxisScale.Linear), (RunPlots.TimeScale(overridden), RunPlots.StateScale(overridden)));
        // Listed times and coordinates have no declared spacing: the values decide.
        Assert.Equal((AxisScale.Auto, AxisScale.Auto), (RunPlots.TimeScale(listed), RunPlots.StateScale(listed)));
        Assert.True(PlotAxis.ForGrid(AxisScale.Auto, [0.0, 1e-3, 1e-2, 0.1, 1.0]).IsLog);
        Assert.False(PlotAxis.ForGrid(AxisScale.Auto, [1.0, 2.0, 3.0]).IsLog);
    }

    [Fact]
    public void UnknownAxisScale_IsAnErrorAtItsValue()
    {
        using var scratch = new DeckScratch();

        var error = scratch.FailAt(DeckScratch.Valid(extra: "[plot]\ntime_axis = \"§logarithmic\""));

        Assert.Contains("\"log\"", error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void EmptyCoordinateName_IsAnErrorAtItsValue()
    {
        using var scratch = new DeckScratch();

        var error = scratch.FailAt(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"a\", \"b\", \"c\"]\ncoordinate_name = \"§ \""));

        Assert.Contains("states.coordinate_name", error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void CascadeDemo_PopulationsPlotDrawsNothingBelowTheResolution()
    {
        // Issue 8 section 4: the cascade demo's populations plot drew rounding noise near 1e-20;
        // nothing below about 1e-15 of the total may be drawn as data.
        var run = new DeckRun(DeckPipeline.Load(CliRunner.DemoDeck("cascade.toml"), [], new ManagedLinearAlgebra()));
        var results = new RunResults(run.Exact, run.Explicit, run.Spectrum.Values, run.Spectrum.ZeroTolerance, run.Steady.Populations, run.ExplicitStep, "rk4");
        var largestTotal = run.Exact.Populations.Max(p => p.Sum());

        var model = RunPlots.PopulationsModel(run.Loaded.Deck, run.Loaded.States, results);

        Assert.True(model.Y.IsLog);
        Assert.True(model.X.IsLog);
        Assert.All(model.Layers.Where(l => l.Name != "floor").SelectMany(l => l.Ys), y => Assert.True(y >= 1e-15 * largestTotal, $"{y} is drawn"));
        Assert.InRange(model.Floor!.Value / largestTotal, 1e-15, 1e-14);
        Assert.Equal("wave number k (1/L0)", RunPlots.StateAxisLabel(run.Loaded.Deck.Plot));
    }

    [Fact]
    public void FewStates_AreAllPlotted_ManyAreSampledOverTheGrid()
    {
        Assert.Equal([0, 1, 2, 3, 4, 5], RunPlots.PlottedStates([], 6));
        Assert.Equal([0, 12, 24, 35, 47], RunPlots.PlottedStates([], 48));
        Assert.Equal([3], RunPlots.PlottedStates([3], 48));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_WritesTheBoltzmannPlotWhereTheDeckGivesEnergies()
    {
        using var folder = new TempFolder();

        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("three-level.toml"), "--out", folder.Path);

        Assert.True(code == ExitCodes.Success, error);
        Assert.True(File.Exists(folder.File("boltzmann.png")));
        Assert.True(File.Exists(folder.File("boltzmann-final.csv")));
    }
}
