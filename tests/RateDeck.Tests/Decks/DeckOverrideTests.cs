using RateDeck.Decks;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary><c>--set key=value</c> overrides change the deck before validation; bad ones fail plainly.</summary>
public sealed class DeckOverrideTests : IDisposable
{
    private readonly DeckScratch _scratch = new();

    public void Dispose() => _scratch.Dispose();

    private static string WithParameter => DeckScratch.Valid(extra: "[parameters]\nalpha = 0.25\n[initial]\nequilibrium = true");

    [Fact]
    public void ParameterOverride_ReplacesTheValueAndIsKeptAsGiven()
    {
        var deck = _scratch.Parse(WithParameter, "alpha=0.75");
        Assert.Equal(0.75, deck.Parameters["alpha"].Value);
        Assert.Equal(SourceSpan.None("--set alpha=0.75"), deck.Parameters["alpha"].Span);
        Assert.Equal(["alpha=0.75"], deck.Overrides);
    }

    [Fact]
    public void DottedParameterOverride_Works()
    {
        Assert.Equal(-3.0, _scratch.Parse(WithParameter, "parameters.alpha=-3").Parameters["alpha"].Value);
    }

    [Fact]
    public void DeckKeyOverrides_SetTemperatureRunAndMethod()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(), "temperature.kT=0.03", "run.t_end=10", "run.dt=0.01", "run.explicit=euler");
        Assert.Equal(0.03, deck.KT);
        Assert.Equal(SourceSpan.None("--set temperature.kT=0.03"), deck.KTSpan);
        Assert.Equal(10.0, deck.Run.EndTime);
        Assert.Equal(0.01, deck.Run.Dt);
        Assert.Equal(ExplicitMethod.Euler, deck.Run.Method);
    }

    [Fact]
    public void KTOverride_ReplacesAKelvinTemperature()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(temperature: "kelvin = 300"), "temperature.kT=0.1");
        Assert.Equal(0.1, deck.KT);
    }

    [Fact]
    public void InitialStateOverride_ReplacesEquilibrium()
    {
        var deck = _scratch.Parse(WithParameter, "initial.state=c");
        Assert.Equal(2, Assert.IsType<InitialInState>(deck.Initial).State);
    }

    [Fact]
    public void OverrideIntoAnAbsentTable_CreatesIt()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(), "losses.by_state.b=0.5");
        var losses = Assert.IsType<PerStateValues>(deck.Losses);
        Assert.Equal([0.0, 0.5, 0.0], losses.Values);
    }

    [Fact]
    public void ArrayOverride_IsParsedAsToml()
    {
        var deck = _scratch.Parse(DeckScratch.Valid(), "energies.values=[0, 0.5, 4]", "run.plot_states=[\"c\", 1]");
        Assert.Equal([0.0, 0.5, 4.0], Assert.IsType<PerStateValues>(deck.Energies).Values);
        Assert.Equal([2, 0], deck.Run.PlotStates);
    }

    [Fact]
    public void UnknownParameterOverride_FailsWithAHint()
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(WithParameter, "alpah=1"));
        Assert.Equal(SourceSpan.None("--set alpah=1"), error.Span);
        Assert.Contains("Did you mean `alpha`?", error.Problem);
        Assert.Equal("--set alpah=1: " + error.Problem, error.Message);
    }

    [Theory]
    [InlineData("run.tend=5", "t_end")]
    [InlineData("remove:run.t_frist", "t_first")]
    public void UnknownDeckKeyOverrideOrRemoval_FailsWithAHint(string text, string meant)
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid(), text));
        Assert.Equal(SourceSpan.None("--set " + text), error.Span);
        Assert.Contains($"Did you mean `{meant}`?", error.Problem);
    }

    [Fact]
    public void UnknownTableOverride_FailsWithAHint()
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid(), "temprature.kT=1"));
        Assert.Contains("Did you mean `temperature`?", error.Problem);
    }

    [Fact]
    public void OverrideWithoutEquals_Fails()
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid(), "run.t_end"));
        Assert.Equal(SourceSpan.None("--set run.t_end"), error.Span);
        Assert.Contains("key=value", error.Problem);
    }

    [Fact]
    public void OverrideOfATable_Fails()
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid(), "run=3"));
        Assert.Contains("`run` is a table", error.Problem);
    }

    [Fact]
    public void OverrideWithAValueOfTheWrongType_FailsAtTheOverride()
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid(), "run.t_end=soon"));
        Assert.Equal(SourceSpan.None("--set run.t_end=soon"), error.Span);
        Assert.Contains("`run.t_end` must be a number", error.Problem);
    }

    [Fact]
    public void OverrideWithAnInvalidValue_FailsAtTheOverride()
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid(), "run.t_end=-1"));
        Assert.Equal(SourceSpan.None("--set run.t_end=-1"), error.Span);
        Assert.Contains("must be > 0", error.Problem);
    }

    [Fact]
    public void RemoveOverride_LetsALinearGridReplaceALogarithmicOne()
    {
        var logGrid = DeckScratch.Valid(run: "t_end = 1.0\nspacing = \"log\"\nt_first = 0.001");
        var refused = Assert.Throws<DeckException>(() => _scratch.Parse(logGrid, "run.spacing=linear"));
        Assert.Contains("`t_first` starts a logarithmic output grid", refused.Problem);

        var deck = _scratch.Parse(logGrid, "run.spacing=linear", "remove:run.t_first");
        Assert.Equal(OutputSpacing.Linear, deck.Run.Spacing);
        Assert.Null(deck.Run.FirstTime);
        Assert.Equal(["run.spacing=linear", "remove:run.t_first"], deck.Overrides);
    }

    [Fact]
    public void RemoveOverride_OfATable_DropsIt_AndOfAnAbsentKey_ChangesNothing()
    {
        var pumped = DeckScratch.Valid(extra: "[pumping]\nby_state = { a = 1.0 }");
        Assert.NotNull(_scratch.Parse(pumped).Pumping);
        Assert.Null(_scratch.Parse(pumped, "remove:pumping").Pumping);
        Assert.Equal(0.5, _scratch.Parse(DeckScratch.Valid(), "remove:run.dt", "remove:losses.by_state.b").KT);
    }

    [Fact]
    public void EmptyValue_IsAnErrorNotARemoval()
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid(), "run.t_end="));
        Assert.Contains("remove:key", error.Problem);
    }
}
