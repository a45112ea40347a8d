using RateDeck.Decks;
using RateDeck.States;
using RateDeck.Tests.Decks;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.States;

/// <summary>
/// Energies and weights written as expressions of x, i (one-based) and deck parameters, read from
/// real deck text: they give exactly the values written out per state, and a bad value is reported
/// at the expression's first character, naming the state.
/// </summary>
public sealed class PerStateExpressionTests : IDisposable
{
    // Rydberg constant for hydrogen R_H = 109677.58 cm^-1 (CODATA value, from memory).
    private const double _rydbergHydrogen = 109677.58;

    /// <summary>A kernel of 1 between neighbours: these tests need some coupling, not a rate file.</summary>
    private const string _neighbourKernel = "kind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"1\"\nband = 1";

    private readonly DeckScratch _scratch = new();

    public void Dispose() => _scratch.Dispose();

    // Bohr levels E_n = R_H (1 - 1/n^2) above the ground term and weights g_n = 2 n^2 (textbook
    // hydrogen atom, e.g. Bransden and Joachain, Physics of Atoms and Molecules, ch. 3; from memory),
    // written with i = n. Were i zero-based, g_1 would be 0 and the deck would be refused.
    [Fact]
    public void HydrogenLevelsAsExpressionsOfI_EqualTheSameValuesWrittenOut()
    {
        var modelled = Build(HydrogenDeck("expression = \"R*(1 - 1/i^2)\"", "expression = \"2*i^2\""));
        double[] energies = [.. Enumerable.Range(1, 4).Select(n => _rydbergHydrogen * (1 - 1.0 / (n * n)))];
        var listed = Build(HydrogenDeck($"values = [{List(energies)}]", "values = [2, 8, 18, 32]"));

        Assert.Equal(listed.Energies, modelled.Energies);
        Assert.Equal(listed.LogWeights, modelled.LogWeights);
        Assert.Equal(listed.LogEquilibrium, modelled.LogEquilibrium);
        Assert.Equal(Math.Log(2), modelled.LogWeights[0]);

        // The Bohr levels lie within 2 cm^-1 of the NIST ASD term values 82259.1, 97492.3, 102823.9
        // cm^-1 (from memory): fine structure lowers the ground term by about alpha^2 R_H / 4 = 1.5 cm^-1
        // (Dirac energy levels, textbook), which the Bohr formula leaves out.
        double[] nist = [0.0, 82259.1, 97492.3, 102823.9];
        for (var n = 0; n < 4; n++)
        {
            Assert.Equal(nist[n], modelled.Energies[n], 2.0);
        }
    }

    // x and i differ on this grid (x = 0.5, 1.0, 1.5, 2.0): each expression uses both and two
    // parameters, and must give bit for bit what the same arithmetic gives written out.
    [Fact]
    public void EnergyAndWeightExpressionsOfXIAndParameters_EqualTheSameValuesGivenExplicitly()
    {
        const double a = 0.37;
        const double b = 0.125;
        double[] x = [0.5, 1.0, 1.5, 2.0];
        double[] energies = [.. x.Select((xi, k) => a * (xi * xi) + b * (k + 1))];
        double[] weights = [.. x.Select((xi, k) => (k + 1) + xi / a)];
        const string grid = "spacing = \"linear\"\ncount = 4\nfrom = 0.5\nto = 2.0";
        var parameters = $"[parameters]\na = {a:R}\nb = {b:R}";

        var modelled = Build(DeckScratch.Valid(states: grid, energies: "expression = \"a*x^2 + b*i\"", weights: "expression = \"i + x/a\"", transfer: _neighbourKernel, extra: parameters));
        var listed = Build(DeckScratch.Valid(states: grid, energies: $"values = [{List(energies)}]", weights: $"values = [{List(weights)}]", transfer: _neighbourKernel, extra: parameters));

        Assert.Equal(x, modelled.Coordinates);
        Assert.Equal(energies, modelled.Energies);
        Assert.Equal(listed.LogWeights, modelled.LogWeights);
        Assert.Equal(listed.LogEquilibrium, modelled.LogEquilibrium);
    }

    [Fact]
    public void ParameterOverride_ReachesTheExpressions()
    {
        var text = DeckScratch.Valid(energies: "expression = \"c*i\"", weights: "expression = \"c\"", transfer: _neighbourKernel, extra: "[parameters]\nc = 1.0");
        var states = StateSpaceBuilder.Build(_scratch.Parse(text, "c=2.5"));
        Assert.Equal([2.5, 5.0, 7.5], states.Energies);
        Assert.All(states.LogWeights, w => Assert.Equal(Math.Log(2.5), w));
    }

    [Theory]
    [InlineData("3 - i", "'c' (state 3) is 0")]
    [InlineData("2.5 - x", "'c' (state 3) is -0.5")]
    [InlineData("log(x - 1)", "'a' (state 1) is -Infinity")]
    [InlineData("sqrt(2.5 - x)", "'c' (state 3) is NaN")]
    public void WeightExpressionGivingNoPositiveWeight_IsRejectedAtTheExpressionNamingTheState(string expression, string state)
    {
        var error = StageErrors.FailAt(_scratch, DeckScratch.Valid(weights: $"expression = \"§{expression}\"", transfer: _neighbourKernel), BuildStates);
        Assert.Contains($"weight of state {state}", error.Problem, StringComparison.Ordinal);
        Assert.Contains("more than zero", error.Problem, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("sqrt(2.5 - x)", "'c' (state 3) is NaN")]
    [InlineData("1/(x - 2)", "'b' (state 2) is Infinity")]
    public void EnergyExpressionGivingNaNOrInfinity_IsRejectedAtTheExpressionNamingTheState(string expression, string state)
    {
        var error = StageErrors.FailAt(_scratch, DeckScratch.Valid(energies: $"expression = '§{expression}'", transfer: _neighbourKernel), BuildStates);
        Assert.Contains($"energy of state {state}", error.Problem, StringComparison.Ordinal);
        Assert.Contains("finite", error.Problem, StringComparison.Ordinal);
    }

    private static string HydrogenDeck(string energies, string weights) => DeckScratch.Valid(
        units: "energy = \"cm-1\"",
        temperature: "kelvin = 10000.0",
        states: "coordinates = [1, 2, 3, 4]\nlabels = [\"n1\", \"n2\", \"n3\", \"n4\"]",
        energies: energies,
        weights: weights,
        transfer: _neighbourKernel,
        extra: $"[parameters]\nR = {_rydbergHydrogen:R}");

    private static string List(IEnumerable<double> values) => string.Join(", ", values.Select(v => v.ToString("R", System.Globalization.CultureInfo.InvariantCulture)));

    private StateSpace Build(string text) => StateSpaceBuilder.Build(_scratch.Parse(text));

    private static void BuildStates(Deck deck) => StateSpaceBuilder.Build(deck);
}
