using System.Text.Json;
using RateDeck.Decks;
using RateDeck.Expressions;
using RateDeck.Sensitivities;
using Xunit;

namespace RateDeck.Tests.Sensitivities;

/// <summary>
/// The divided differences of the exponential and the symbolic derivatives of deck expressions,
/// against mpmath at 50 digits (tests/reference/make_sensitivity_fixtures.py, mpmath 1.2.1):
/// node pairs from far apart to equal, through the nearly equal pairs the series serve.
/// </summary>
public sealed class DividedDifferenceTests
{
    private static JsonElement Fixture(string name)
    {
        using var document = JsonDocument.Parse(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "fixtures", "sensitivities.json")));
        return document.RootElement.GetProperty(name).Clone();
    }

    [Fact]
    public void DividedDifferencesOfTheExponentialMatchMpmath()
    {
        foreach (var row in Fixture("divided_differences").EnumerateArray())
        {
            var (a, b, first, second) = (row[0].GetDouble(), row[1].GetDouble(), row[2].GetDouble(), row[3].GetDouble());
            // 1e-13 relative: the bound stated on DividedDifferences (the quotient's cancellation, the series' next term).
            Assert.True(Math.Abs(DividedDifferences.Exp1(a, b) - first) <= 1e-13 * Math.Abs(first), $"exp[{a}, {b}] = {DividedDifferences.Exp1(a, b):R}, mpmath {first:R}");
            Assert.True(Math.Abs(DividedDifferences.Exp2AtZero(a, b) - second) <= 1e-13 * Math.Abs(second), $"exp[{a}, {b}, 0] = {DividedDifferences.Exp2AtZero(a, b):R}, mpmath {second:R}");
        }
    }

    [Fact]
    public void SymbolicDerivativesOfDeckExpressionsMatchMpmath()
    {
        foreach (var row in Fixture("expression_derivatives").EnumerateArray())
        {
            var text = row.GetProperty("expression").GetString()!;
            var point = row.GetProperty("point").EnumerateObject().ToArray();
            var names = point.Select(p => p.Name).ToArray();
            var derivative = ExpressionCompiler.CompileDerivative(text, SourceSpan.None("test"), names, row.GetProperty("variable").GetString()!);
            var value = derivative.Evaluate([.. point.Select(p => p.Value.GetDouble())]);
            var expected = row.GetProperty("derivative").GetDouble();
            Assert.True(Math.Abs(value - expected) <= 1e-13 * Math.Abs(expected), $"d({text})/d{row.GetProperty("variable").GetString()} = {value:R}, mpmath {expected:R}");
        }
    }

    [Fact]
    public void DifferentiatingThroughMaxIsRefusedNamingTheFunction()
    {
        var error = Assert.Throws<NotSupportedException>(() => ExpressionCompiler.CompileDerivative("z*max(x, y)", SourceSpan.None("test"), ["x", "y", "z"], "x"));
        Assert.Contains("max", error.Message, StringComparison.Ordinal);
        // A variable that does not reach max is differentiated as usual: d(z*max(x, y))/dz = max(x, y).
        Assert.Equal(3.0, ExpressionCompiler.CompileDerivative("z*max(x, y)", SourceSpan.None("test"), ["x", "y", "z"], "z").Evaluate([3.0, 2.0, 5.0]));
    }
}
