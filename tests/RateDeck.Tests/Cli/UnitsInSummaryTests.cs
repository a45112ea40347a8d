using System.Globalization;
using System.Text.Json;
using System.Text.RegularExpressions;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// Issue 8 section 2.6: every time a summary prints carries the deck's time unit and every rate
/// its inverse, and every JSON summary names both units beside its provenance.
/// </summary>
public sealed class UnitsInSummaryTests
{
    /// <summary>
    /// decks/two-level.toml with its time unit said to be ms: levels 0.1 eV apart with degeneracies
    /// 1 and 3 at kT = 0.05 eV, a measured downward rate of 2e3 per ms, t_end = 5e-3 ms. Two-level
    /// relaxation (textbook first-order kinetics, e.g. Atkins' Physical Chemistry): the one non-zero
    /// eigenvalue is -(k_down + k_up), k_up = k_down (g_u/g_g) exp(-dE/kT).
    /// </summary>
    private static readonly string[] _twoLevelInMilliseconds = [CliRunner.DemoDeck("two-level.toml"), "--set", "units.time=ms"];

    private static readonly double _relaxationRate = 2e3 * (1 + 3 * Math.Exp(-2));

    /// <summary>Runs <paramref name="verb"/> on the two-level deck in ms with <paramref name="options"/>.</summary>
    private static (int Code, string Output) TwoLevel(string verb, params string[] options)
    {
        var (code, output, error) = CliRunner.Run([verb, .. _twoLevelInMilliseconds, .. options]);
        return (code, output + error);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Stiffness_PrintsEachRateWithItsInverseTimeUnitAndEachStepWithItsTimeUnit()
    {
        var (code, output) = TwoLevel("stiffness");
        Assert.True(code == ExitCodes.Success, output);

        var rho = Line(output, "spectral radius rho");
        Assert.EndsWith(" /ms", rho, StringComparison.Ordinal);
        // The printed value (three digits) is the two-level relaxation rate.
        Assert.Equal(_relaxationRate, Number(rho.Split(' ', StringSplitOptions.RemoveEmptyEntries)[^2]), 0.005 * _relaxationRate);
        Assert.EndsWith(" /ms", Line(output, "slowest non-zero rate"), StringComparison.Ordinal);
        Assert.EndsWith(" /ms", Line(output, "max |K_ii|"), StringComparison.Ordinal);
        Assert.Contains("largest dt (ms)", output, StringComparison.Ordinal);
        Assert.Contains("steps to t = 5e-3 ms", output, StringComparison.Ordinal);
        Assert.Matches(@"dt <= [0-9.e-]+ ms needs \d+ steps to t_end = 5e-3 ms", Line(output, "recommendation:"));
    }

    [Trait("Through", "program")]
    [Fact]
    public void StiffnessWithAStep_NamesTheUnitOfTheStepAndOfEveryLimitItIsJudgedAgainst()
    {
        // Forward Euler is stable to 2 / rho (textbook stability region |1 + lambda dt| <= 1): 1e-3 ms is beyond it.
        Assert.True(1e-3 > 2 / _relaxationRate);
        var (code, output) = TwoLevel("stiffness", "--dt", "1e-3", "--method", "euler");

        Assert.Equal(ExitCodes.UnsafeTimeStep, code);
        Assert.Contains("dt = 1e-3 ms: euler UNSTABLE", output, StringComparison.Ordinal);
        Assert.Matches(@"dt = 1e-3 ms is above the euler stability limit [0-9.e-]+ ms", output);
        Assert.Contains("explicit stepping at dt = 1e-3 ms needs 5 steps to t = 5e-3 ms", output, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_ExplicitLineAndResults_CarryTheTimeUnit()
    {
        using var folder = new TempFolder();
        var (code, output) = TwoLevel("run", "--no-plots", "--out", folder.Path);
        Assert.True(code == ExitCodes.Success, output);

        Assert.Matches(@"explicit     rk4, dt = [0-9.e-]+ ms \(stability limit [0-9.e-]+ ms\); .*fixed step dt = [0-9.e-]+ ms;", output);
        Assert.Matches(@"cap [0-9.e-]+ ms\)", output);
        Assert.Contains("outputs      51 times to t = 5e-3 ms", output, StringComparison.Ordinal);
        Assert.Matches(@"\(at t = [0-9.e-]+ ms, state", output);
        Assert.Matches(@"residual \|K P\| = [0-9.e-]+ /ms; approach time [0-9.e-]+ ms", output);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Steady_PrintsTheApproachTimeAsOneOverTheRelaxationRateInTheTimeUnit()
    {
        using var folder = new TempFolder();
        var (code, output) = TwoLevel("steady", "--out", folder.Path);
        Assert.True(code == ExitCodes.Success, output);

        var approach = Regex.Match(output, @"approach time ([0-9.e-]+) ms,").Groups[1].Value;
        Assert.Equal(1 / _relaxationRate, Number(approach), 0.005 / _relaxationRate);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Steady_WithoutADecayingMode_SaysSoInsteadOfAnInfiniteApproachTime()
    {
        // One state and no rate: nothing relaxes, so there is no approach time to print (common practice).
        using var folder = new TempFolder();
        File.WriteAllText(folder.File("one.toml"), "format = 1\n[units]\ntime = \"ms\"\n[temperature]\nkT = 1\n[states]\ncoordinates = [1.0]\n"
            + "[energies]\nvalues = [0.0]\n[transfer]\nkind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"1\"\n[run]\nt_end = 1\n");
        var (code, output, error) = CliRunner.Run("steady", folder.File("one.toml"), "--out", folder.Path);

        Assert.True(code == ExitCodes.Success, error);
        Assert.Contains("approach time none (no mode decays)", output, StringComparison.Ordinal);
        Assert.DoesNotContain("Infinity", output, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("check")]
    [InlineData("stiffness")]
    [InlineData("steady")]
    [InlineData("run")]
    public void EveryVerbsJson_NamesTheTimeAndRateUnits(string verb)
    {
        using var folder = new TempFolder();
        string[] options = verb switch
        {
            "run" => ["--no-plots", "--out", folder.Path],
            "steady" => ["--out", folder.Path],
            _ => [],
        };
        var summary = JsonDocument.Parse(TwoLevel(verb, ["--json", .. options]).Output).RootElement;

        Assert.Equal("ms", summary.GetProperty("time_unit").GetString());
        Assert.Equal("1/ms", summary.GetProperty("rate_unit").GetString());
    }

    [Trait("Through", "program")]
    [Fact]
    public void FitJson_CarriesTheSameProvenanceAsTheOtherVerbs()
    {
        using var folder = new TempFolder();
        var fit = CliRunner.Run("fit", CliRunner.DemoDeck("fit-ladder.toml"), "--json", "--no-plots", "--out", folder.Path);
        var summary = JsonDocument.Parse(fit.Out).RootElement;

        // decks/fit-ladder.toml: six states, kT = 1 in model energy units (no kelvin), times in ms.
        Assert.True(summary.GetProperty("converged").GetBoolean(), fit.Error);
        Assert.Equal(6, summary.GetProperty("states").GetInt32());
        Assert.Equal(1.0, summary.GetProperty("kt").GetDouble());
        Assert.Equal("none", summary.GetProperty("energy_unit").GetString());
        Assert.Equal(JsonValueKind.Null, summary.GetProperty("temperature_kelvin").ValueKind);
        Assert.Equal("ms", summary.GetProperty("time_unit").GetString());
    }

    private static string Line(string output, string start) =>
        output.Split('\n').Select(l => l.Trim()).First(l => l.StartsWith(start, StringComparison.Ordinal));

    private static double Number(string text) => double.Parse(text, CultureInfo.InvariantCulture);
}
