using System.Globalization;
using System.Security.Cryptography;
using System.Text.Json;
using CsvHelper;
using RateDeck.Cli;
using RateDeck.Outputs;
using RateDeck.Tests.Mechanics;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// <c>ratedeck check</c> on a deck with a Lagrangian: the per-state mechanics table on stdout,
/// <c>mechanics.csv</c> with the provenance header in the output folder, the <c>mechanics</c>
/// object of <c>--json</c>, and a deck error at the Lagrangian for an energy above the separatrix.
/// The reference for the numbers is the plane pendulum, T = 4 K(k) / w0 with k^2 = E / (2 m g0 len)
/// (Landau and Lifshitz, Mechanics, section 11, problem 1, from memory; K by the AGM of Abramowitz
/// and Stegun 17.6); the demo deck has m = len = 1, so w0 = sqrt(g0).
/// </summary>
public sealed class CheckMechanicsTests : IDisposable
{
    private const string _demo = "pendulum-ladder.toml";
    private const double _planck = 0.05;

    private readonly TempFolder _out = new();

    public void Dispose() => _out.Dispose();

    [Trait("Through", "program")]
    [Fact]
    public void Check_PendulumDemo_PrintsEveryStateAndWritesMechanicsCsvWithProvenance()
    {
        var deck = CliRunner.DemoDeck(_demo);
        var (code, output, error) = CliRunner.Run("check", deck, "--out", _out.Path);

        Assert.True(code == ExitCodes.Success, error);
        Assert.Contains("result: every check passed", output, StringComparison.Ordinal);
        Assert.Equal(Enumerable.Range(1, 40).Select(k => $"e{k}"), TableLabels(output));

        var table = ReadCsv(Path.Combine(_out.Path, "mechanics.csv"));
        Assert.Equal(["label", "energy", "action", "period", "weight", "turning_point_low", "turning_point_high", "relative_error"], table.Header);
        Assert.Equal(40, table.Rows.Count);
        Assert.Contains($"# deck_sha256: {Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(deck)))}", table.Comments);
        Assert.Contains("# overrides: none", table.Comments);
        Assert.Contains("# units: energy=none, action=none*ms, period=ms, weight=1/none", table.Comments);
        for (var row = 0; row < 40; row++)
        {
            var energy = table.Number(row, "energy");
            MechanicsAssert.Relative(4 * EllipticIntegrals.K(energy / 2), table.Number(row, "period"), 1e-10);
            MechanicsAssert.Relative(table.Number(row, "period") / _planck, table.Number(row, "weight"), 1e-15);

            // Turning points +-theta0 with 1 - cos theta0 = E / (m g0 len) (energy conservation, textbook).
            MechanicsAssert.Relative(Math.Acos(1 - energy), table.Number(row, "turning_point_high"), 1e-12);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_WithMoreThanFortyStates_ShowsTheFirstAndLastFiveButWritesThemAll()
    {
        var (code, output, error) = CliRunner.Run("check", CliRunner.DemoDeck(_demo), "--out", _out.Path, "--set", "states.count=60");

        Assert.True(code == ExitCodes.Success, error);
        Assert.Equal(new[] { 1, 2, 3, 4, 5, 56, 57, 58, 59, 60 }.Select(k => $"e{k}"), TableLabels(output));
        Assert.Contains("... 50 more states ...", output, StringComparison.Ordinal);
        Assert.Equal(60, ReadCsv(Path.Combine(_out.Path, "mechanics.csv")).Rows.Count);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_WithParameterOverride_RescalesThePeriodsAndRecordsTheOverride()
    {
        const double g0 = 1.44;
        var (code, _, error) = CliRunner.Run("check", CliRunner.DemoDeck(_demo), "--out", _out.Path, "--set", "g0=1.44");

        Assert.True(code == ExitCodes.Success, error);
        var table = ReadCsv(Path.Combine(_out.Path, "mechanics.csv"));
        Assert.Contains("# overrides: [\"g0=1.44\"]", table.Comments);
        for (var row = 0; row < table.Rows.Count; row++)
        {
            var m = table.Number(row, "energy") / (2 * g0);
            MechanicsAssert.Relative(4 * EllipticIntegrals.K(m) / Math.Sqrt(g0), table.Number(row, "period"), 1e-10);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void CheckJson_CarriesTheMechanicsArrays()
    {
        var (code, output, error) = CliRunner.Run("check", CliRunner.DemoDeck(_demo), "--out", _out.Path, "--json");

        Assert.True(code == ExitCodes.Success, error);
        var mechanics = JsonDocument.Parse(output).RootElement.GetProperty("mechanics");
        var periods = Numbers(mechanics, "periods");
        var weights = Numbers(mechanics, "weights");
        Assert.Equal(40, weights.Length);
        Assert.Equal(40, Numbers(mechanics, "actions").Length);
        Assert.True(mechanics.GetProperty("weights_from_mechanics").GetBoolean());
        Assert.Equal(_planck, mechanics.GetProperty("planck").GetDouble());
        Assert.Equal(Path.Combine(_out.Path, "mechanics.csv"), mechanics.GetProperty("file").GetString());
        for (var i = 0; i < 40; i++)
        {
            MechanicsAssert.Relative(periods[i] / _planck, weights[i], 1e-15);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_DeckWithoutALagrangian_WritesNoMechanics()
    {
        var (code, output, _) = CliRunner.Run("check", CliRunner.DemoDeck("three-level.toml"), "--out", _out.Path, "--json");

        Assert.Equal(ExitCodes.Success, code);
        Assert.Equal(JsonValueKind.Null, JsonDocument.Parse(output).RootElement.GetProperty("mechanics").ValueKind);
        Assert.Empty(_out.Entries());
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_EnergyAboveTheSeparatrix_ExitsTwoAtTheLagrangianNamingTheState()
    {
        var deck = CliRunner.DemoDeck(_demo);
        var (code, output, error) = CliRunner.Run("check", deck, "--out", _out.Path, "--set", "states.to=2.1");

        // Grid 0.05 .. 2.1 in 39 steps: e39 at 2.047 is the first grain above the separatrix at 2.
        var lines = File.ReadAllLines(deck);
        var line = Array.FindIndex(lines, l => l.StartsWith("lagrangian = \"", StringComparison.Ordinal));
        var column = lines[line].IndexOf('"', StringComparison.Ordinal) + 2;
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", output);
        Assert.StartsWith($"{deck}:{line + 1}:{column}: the Lagrangian fails for state 'e39' (state 39): ", error, StringComparison.Ordinal);
        Assert.Contains("separatrix", error, StringComparison.Ordinal);
        Assert.Empty(_out.Entries());
    }

    /// <summary>The labels of the rows of the mechanics table in a check summary, in order.</summary>
    private static IEnumerable<string> TableLabels(string output)
    {
        var lines = output.Split('\n');
        var start = Array.FindIndex(lines, l => l.StartsWith("mechanics ", StringComparison.Ordinal)) + 2;
        return lines.Skip(start)
            .TakeWhile(l => !l.StartsWith("  units:", StringComparison.Ordinal))
            .Where(l => !l.StartsWith("  ...", StringComparison.Ordinal))
            .Select(l => l.Split(' ', StringSplitOptions.RemoveEmptyEntries)[0])
            .ToArray();
    }

    private static double[] Numbers(JsonElement element, string name) => element.GetProperty(name).EnumerateArray().Select(e => e.GetDouble()).ToArray();

    private static CsvTable ReadCsv(string path)
    {
        var comments = File.ReadLines(path).TakeWhile(l => l.StartsWith('#')).ToArray();
        using var reader = CsvReader.FromFile(path, ResultCsv.ReaderOptions);
        var rows = new List<string[]>();
        while (reader.Read())
        {
            rows.Add(reader.Current.ToArray());
        }

        return new CsvTable(reader.Headers!.ToArray(), rows, comments);
    }

    private sealed record CsvTable(string[] Header, List<string[]> Rows, string[] Comments)
    {
        public double Number(int row, string name) => double.Parse(Rows[row][Array.IndexOf(Header, name)], CultureInfo.InvariantCulture);
    }
}
