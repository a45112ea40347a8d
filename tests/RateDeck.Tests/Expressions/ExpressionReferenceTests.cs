using System.Text.Json;
using RateDeck.Decks;
using RateDeck.Expressions;
using Xunit;

namespace RateDeck.Tests.Expressions;

/// <summary>
/// Deck expressions against the same formulas evaluated with NumPy 1.24.2 and SciPy 1.10.1
/// (scipy.special.gamma and erf), written by tests/reference/expressions_reference.py into
/// fixtures/expressions.json, which records the versions.
/// </summary>
public class ExpressionReferenceTests
{
    public static TheoryData<string, string, double, double> Cases()
    {
        var path = Path.Combine(AppContext.BaseDirectory, "fixtures", "expressions.json");
        using var fixture = JsonDocument.Parse(File.ReadAllText(path));
        var data = new TheoryData<string, string, double, double>();
        foreach (var item in fixture.RootElement.GetProperty("cases").EnumerateArray())
        {
            data.Add(
                item.GetProperty("expression").GetString()!,
                item.GetProperty("variables").GetRawText(),
                item.GetProperty("value").GetDouble(),
                item.GetProperty("relativeTolerance").GetDouble());
        }
        return data;
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Expression_MatchesNumPyAndSciPy(string expression, string variablesJson, double expected, double relativeTolerance)
    {
        var variables = JsonSerializer.Deserialize<Dictionary<string, double>>(variablesJson)!;
        var compiled = ExpressionCompiler.Compile(expression, new SourceSpan("reference.toml", 1, 1), variables.Keys.ToArray());
        var actual = compiled.Evaluate(variables.Values.ToArray());
        Assert.True(
            Math.Abs(actual - expected) <= relativeTolerance * Math.Abs(expected),
            $"{expression} with {variablesJson}: got {actual:R}, SciPy {expected:R}, relative difference {Math.Abs(actual - expected) / Math.Abs(expected):E2}");
    }

}
