using System.Globalization;
using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// The cascade demo with one measured rate raised to the top of the double range and the rate
/// file cut after shell k41, as the fuzz test mutated it (seed 1, case 5442): the steady-state
/// solve overflowed (populations inf and NaN, printed with exit 0) and the implicit integrator
/// stalled until it gave up with "internal error". The check is a fact of the trade (common
/// practice, no single source): in a steady state all that is pumped in leaves through the
/// losses, and here the only loss the pumped class keeps is the friction at k1 (k48, the other
/// sink, is cut off), so P(k1) = pumping / friction = 1 / 0.2 = 5 exactly, whatever the rates.
/// </summary>
public sealed class WideRateSpreadTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    [Trait("Through", "program")]
    [Theory]
    [InlineData("1e308")]
    [InlineData("1e307")]
    [InlineData("1e305")]
    [InlineData("19.6682")]
    public void CascadeWithOneRateNearTheDoubleLimit_KeepsTheFluxBalanceSteadyState(string fastRate)
    {
        var demo = Path.Combine(AppContext.BaseDirectory, "decks");
        File.Copy(Path.Combine(demo, "cascade.toml"), _folder.File("cascade.toml"));
        var rows = File.ReadAllLines(Path.Combine(demo, "cascade-rates.csv"));
        var cut = Array.FindIndex(rows, r => r.StartsWith("k40,k41,", StringComparison.Ordinal));
        File.WriteAllLines(_folder.File("cascade-rates.csv"), rows.Take(cut + 1).Select(r => r.StartsWith("k38,k39,", StringComparison.Ordinal) ? $"k38,k39,{fastRate}" : r));

        var steady = CliRunner.Run("steady", _folder.File("cascade.toml"), "--json", "--out", _folder.File("steady"));
        var run = CliRunner.Run("run", _folder.File("cascade.toml"), "--exact-only", "--no-plots", "--json", "--out", _folder.File("run"));

        Assert.True(steady.ExitCode == ExitCodes.Success, steady.Error);
        Assert.True(run.ExitCode == ExitCodes.Success, run.Error);
        using var json = JsonDocument.Parse(steady.Out);
        var populations = json.RootElement.GetProperty("populations").EnumerateArray().Select(x => x.GetDouble()).ToArray();
        Assert.Equal(5.0, populations[0], 1e-12);
        Assert.All(populations, p => Assert.True(double.IsFinite(p) && p >= 0, p.ToString(CultureInfo.InvariantCulture)));
        using var summary = JsonDocument.Parse(run.Out);
        var total = summary.RootElement.GetProperty("final_total_population").GetDouble();
        // Pumped at 1 per t0 for t_end = 100 t0 from empty, less what left through k1: positive, at most 100.
        Assert.True(total is > 0 and <= 100.0 + 1e-9, total.ToString(CultureInfo.InvariantCulture));
    }
}
