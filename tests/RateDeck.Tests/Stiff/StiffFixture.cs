using System.Globalization;
using System.Text.Json;

namespace RateDeck.Tests.Stiff;

/// <summary>
/// The mpmath references of tests/reference/make_stiff_fixtures.py (mpmath 1.2.1 from Debian, 90
/// digits; expm checked against eigsy by the script), read from fixtures/stiff.json.
/// </summary>
internal sealed record StiffFixture(string Name, double[] Times, double[][] Populations, double[] DecayRates)
{
    public static string FixturePath => Path.Combine(AppContext.BaseDirectory, "fixtures", "stiff.json");

    public static StiffFixture Case(string name)
    {
        using var document = JsonDocument.Parse(File.ReadAllText(FixturePath));
        var element = document.RootElement.GetProperty("cases").EnumerateArray().Single(c => c.GetProperty("name").GetString() == name);
        static double Parse(JsonElement e) => double.Parse(e.GetString()!, CultureInfo.InvariantCulture);
        return new StiffFixture(
            name,
            [.. element.GetProperty("times").EnumerateArray().Select(t => t.GetDouble())],
            [.. element.GetProperty("populations").EnumerateArray().Select(row => row.EnumerateArray().Select(Parse).ToArray())],
            [.. element.GetProperty("decay_rates").EnumerateArray().Select(Parse)]);
    }

    /// <summary>
    /// The largest relative difference over the populations above 1e-12 of the total (the issue's
    /// acceptance rule), with the time and state where it occurs.
    /// </summary>
    public static (double Worst, string Where) WorstRelative(double[][] expected, double[][] actual)
    {
        var (worst, where) = (0.0, "");
        for (var k = 0; k < expected.Length; k++)
        {
            var total = expected[k].Sum();
            for (var i = 0; i < expected[k].Length; i++)
            {
                if (expected[k][i] > 1e-12 * total)
                {
                    var relative = Math.Abs(actual[k][i] - expected[k][i]) / expected[k][i];
                    if (relative > worst)
                    {
                        (worst, where) = (relative, $"output {k}, state {i + 1}: {actual[k][i]:R} against {expected[k][i]:R}");
                    }
                }
            }
        }

        return (worst, where);
    }
}
