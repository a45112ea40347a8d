using System.Globalization;
using System.Text;
using System.Text.Json;
using RateDeck.Tests.Support;

namespace RateDeck.Tests.Stiff;

/// <summary>
/// The references of tests/reference/make_slow_mode_fixtures.py (mpmath 1.3.0 from Debian, 60
/// digits), read from fixtures/slow_modes.json, and the decks they describe, written as a user
/// writes them (docs/deck-format.md).
/// </summary>
internal sealed record SlowModeFixture(string Name, string[] Energies, string[] Down, double[] SlowRates)
{
    public static string FixturePath => Path.Combine(AppContext.BaseDirectory, "fixtures", "slow_modes.json");

    public static SlowModeFixture Case(string name)
    {
        using var document = JsonDocument.Parse(File.ReadAllText(FixturePath));
        var element = document.RootElement.GetProperty("cases").EnumerateArray().Single(c => c.GetProperty("name").GetString() == name);
        static string[] Strings(JsonElement e, string key) => e.TryGetProperty(key, out var array) ? [.. array.EnumerateArray().Select(v => v.GetString()!)] : [];
        return new SlowModeFixture(name, Strings(element, "energies"), Strings(element, "down"),
            [.. Strings(element, "slow_rates").Select(v => double.Parse(v, CultureInfo.InvariantCulture))]);
    }

    /// <summary>
    /// A birth-death chain deck: states 1..N, the given energies (kT = 1), measured downward rates
    /// between neighbours completed upward by detailed balance; <paramref name="run"/> is the [run] table's body.
    /// </summary>
    public static string WriteChain(TempFolder folder, string name, IReadOnlyList<string> energies, IReadOnlyList<string> down, string run = "t_end = 1")
    {
        var csv = new StringBuilder("from,to,rate\n");
        for (var i = 0; i < down.Count; i++)
        {
            csv.Append(CultureInfo.InvariantCulture, $"{i + 2},{i + 1},{down[i]}\n");
        }

        File.WriteAllText(folder.File($"{name}.csv"), csv.ToString());
        return WriteDeck(folder, name, energies.Count, $"""
            [energies]
            values = [{string.Join(", ", energies)}]
            [transfer]
            kind = "one_way"
            direction = "toward_smaller"
            csv = "{name}.csv"
            [run]
            {run}
            """);
    }

    /// <summary>
    /// The full measured deck of the fixture's "full-leaking-200" case: every rate from
    /// full_rate() of the script (a digit times a power of ten, the same decimal text), and a
    /// loss of 1e-9 on state 1.
    /// </summary>
    public static string WriteFullLeaking(TempFolder folder, int n = 200, int cluster = 50)
    {
        var csv = new StringBuilder();
        for (var j = 1; j <= n; j++)
        {
            for (var i = 1; i <= n; i++)
            {
                if (i != j)
                {
                    var rate = (i - 1) / cluster == (j - 1) / cluster
                        ? $"{1 + (((7 * i) + (13 * j)) % 9)}e{(((3 * i) + (5 * j)) % 7) - 1}"
                        : $"{1 + (((5 * i) + (3 * j)) % 9)}e-{9 + ((i + (2 * j)) % 4)}";
                    csv.Append(CultureInfo.InvariantCulture, $"{j},{i},{rate}\n");
                }
            }
        }

        return WriteFull(folder, "full", n, csv.ToString(), $"[losses]\nvalues = [1e-9{string.Concat(Enumerable.Repeat(", 0", n - 1))}]");
    }

    /// <summary>A full measured deck of states 1..<paramref name="n"/> whose rate file holds <paramref name="rows"/> ("from,to,rate" lines), with <paramref name="tables"/> before [run].</summary>
    public static string WriteFull(TempFolder folder, string name, int n, string rows, string tables)
    {
        File.WriteAllText(folder.File($"{name}.csv"), "from,to,rate\n" + rows);
        return WriteDeck(folder, name, n, $"""
            [transfer]
            kind = "full"
            csv = "{name}.csv"
            {tables}
            [run]
            t_end = 1
            """);
    }

    /// <summary>Writes NAME.toml: states 1..<paramref name="n"/> on a linear grid, kT = 1, then <paramref name="tables"/>.</summary>
    private static string WriteDeck(TempFolder folder, string name, int n, string tables)
    {
        var text = $"""
            format = 1
            title = "{name}"
            [states]
            spacing = "linear"
            count = {n}
            from = 1
            to = {n}
            [temperature]
            kT = 1
            {tables}
            """;
        File.WriteAllText(folder.File($"{name}.toml"), text);
        return folder.File($"{name}.toml");
    }
}
