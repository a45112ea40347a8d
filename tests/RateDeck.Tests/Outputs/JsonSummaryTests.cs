using System.Text.Json;
using RateDeck.Decks;
using RateDeck.Outputs;
using Xunit;

namespace RateDeck.Tests.Outputs;

public sealed class JsonSummaryTests
{
    private static readonly Dictionary<string, object?> _summary = new()
    {
        ["deck_path"] = "decks/λ-grains.toml",
        ["spectral_radius"] = 2.0 / 3.0,
        ["stiffness_ratio"] = double.PositiveInfinity,
        ["smallest_rate"] = double.NaN,
        ["optional_dt"] = (double?)null,
        ["method"] = ExplicitMethod.RungeKutta4,
        ["parameters"] = new Dictionary<string, double> { ["kT"] = 1.5, ["W_0"] = double.NegativeInfinity },
        ["eigenvalues"] = new[] { -1.0, 0.0, double.NegativeInfinity },
    };

    [Fact]
    public void FieldNamesAndKeys_AreWrittenAsGiven_EnumsAsSnakeCaseStrings()
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
    public void FiniteNumbers_AreWrittenAsTheLibrarySerializerWritesThem()
    {
        // Reference: System.Text.Json's own serializer (shortest round-trip form), on values at the
        // edges of the double range and ones without an exact binary form.
        double[] numbers = [0.1, 1.0 / 3.0, 5e-324, 2.2250738585072014e-308, 1.7976931348623157e308, -0.0, 1e21, 123456789012345680, 6.02214076e23];

        var json = JsonSummary.Serialize(new Dictionary<string, object?> { ["numbers"] = numbers, ["count"] = 42L, ["index"] = -7 });

        Assert.Equal($"{{\"numbers\":{JsonSerializer.Serialize(numbers)},\"count\":42,\"index\":-7}}", json);
    }

    [Fact]
    public void ValueOfAnUnsupportedKind_IsRefused()
    {
        var summary = new Dictionary<string, object?> { ["when"] = new DateTime(2026, 12, 2, 0, 0, 0, DateTimeKind.Utc) };

        var error = Assert.Throws<ArgumentException>(() => JsonSummary.Serialize(summary));

        Assert.Contains("System.DateTime", error.Message, StringComparison.Ordinal);
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
    public void DictionaryAsSummary_KeepsItsKeys()
    {
        var json = JsonSummary.Serialize(new Dictionary<string, object?> { ["exit_code"] = 0, ["max_relative_difference"] = double.NaN });

        Assert.Equal("{\"exit_code\":0,\"max_relative_difference\":null}", json);
    }
}
