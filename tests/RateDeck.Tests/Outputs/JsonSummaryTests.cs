using System.Text.Json;
using RateDeck.Decks;
using RateDeck.Outputs;
using Xunit;

namespace RateDeck.Tests.Outputs;

public sealed class JsonSummaryTests
{
    private sealed record StiffnessSummary(string DeckPath, double SpectralRadius, double StiffnessRatio, double SmallestRate,
        double? OptionalDt, ExplicitMethod Method, IReadOnlyDictionary<string, double> Parameters, double[] Eigenvalues);

    private static readonly StiffnessSummary _summary = new("decks/λ-grains.toml", 2.0 / 3.0, double.PositiveInfinity, double.NaN,
        null, ExplicitMethod.RungeKutta4, new Dictionary<string, double> { ["kT"] = 1.5, ["W_0"] = double.NegativeInfinity },
        [-1.0, 0.0, double.NegativeInfinity]);

    [Fact]
    public void PropertyNames_AreSnakeCase_EnumsSnakeCaseStrings_DictionaryKeysAsGiven()
    {
        using var document = JsonDocument.Parse(JsonSummary.Serialize(_summary));
        var root = document.RootElement;

        Assert.Equal(["deck_path", "spectral_radius", "stiffness_ratio", "smallest_rate", "optional_dt", "method", "parameters", "eigenvalues"],
            root.EnumerateObject().Select(p => p.Name));
        Assert.Equal("runge_kutta4", root.GetProperty("method").GetString());
        Assert.Equal(["kT", "W_0"], root.GetProperty("parameters").EnumerateObject().Select(p => p.Name));
        Assert.Equal("decks/λ-grains.toml", root.GetProperty("deck_path").GetString());
    }

    [Fact]
    public void NonFiniteNumbers_AreWrittenAsNull_FiniteOnesRoundTrip()
    {
        var json = JsonSummary.Serialize(_summary);
        using var document = JsonDocument.Parse(json);
        var root = document.RootElement;

        Assert.Equal(JsonValueKind.Null, root.GetProperty("stiffness_ratio").ValueKind);
        Assert.Equal(JsonValueKind.Null, root.GetProperty("smallest_rate").ValueKind);
        Assert.Equal(JsonValueKind.Null, root.GetProperty("parameters").GetProperty("W_0").ValueKind);
        Assert.Equal(JsonValueKind.Null, root.GetProperty("eigenvalues")[2].ValueKind);
        Assert.Equal(2.0 / 3.0, root.GetProperty("spectral_radius").GetDouble());
        Assert.Equal(1.5, root.GetProperty("parameters").GetProperty("kT").GetDouble());
        Assert.DoesNotContain("Infinity", json, StringComparison.Ordinal);
        Assert.DoesNotContain("NaN", json, StringComparison.Ordinal);
    }

    [Fact]
    public void Write_IsOneLineByDefault_AndIndentedOnRequest()
    {
        var compact = new StringWriter();
        var indented = new StringWriter();

        JsonSummary.Write(compact, _summary);
        JsonSummary.Write(indented, _summary, indented: true);

        Assert.Single(compact.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries));
        Assert.EndsWith("}\n", compact.ToString(), StringComparison.Ordinal);
        Assert.Contains("\n  \"spectral_radius\": ", indented.ToString(), StringComparison.Ordinal);
        Assert.DoesNotContain('\r', indented.ToString());
    }

    [Fact]
    public void OutputHeader_InASummary_UsesTheKeysOfTheCsvHeader()
    {
        var json = JsonSummary.Serialize(new OutputHeader("0.1.0", "d.toml", "ab", ["kT=1"]));

        Assert.Equal("{\"tool_version\":\"0.1.0\",\"deck_path\":\"d.toml\",\"deck_sha256\":\"ab\",\"overrides\":[\"kT=1\"]}", json);
    }

    [Fact]
    public void DictionaryAsSummary_KeepsItsKeys()
    {
        var json = JsonSummary.Serialize(new Dictionary<string, object?> { ["exit_code"] = 0, ["max_relative_difference"] = double.NaN });

        Assert.Equal("{\"exit_code\":0,\"max_relative_difference\":null}", json);
    }
}
