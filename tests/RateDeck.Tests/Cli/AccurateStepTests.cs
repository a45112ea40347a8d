using System.Globalization;
using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>Issue 8 section 3: the automatic explicit step meets run.accuracy, and a run that misses it says so.</summary>
public sealed class AccurateStepTests
{
    [Trait("Through", "program")]
    [Theory]
    [InlineData("euler")]
    [InlineData("rk4")]
    public void AutomaticStep_MeetsTheAccuracyTargetAgainstTheClosedFormTwoLevelSolution(string method)
    {
        using var folder = new TempFolder();
        const double target = 1e-5;
        var (code, json, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--method", method,
            "--set", $"run.accuracy={target.ToString("R", CultureInfo.InvariantCulture)}", "--json", "--no-plots", "--out", folder.Path);
        Assert.True(code == ExitCodes.Success, error);
        Assert.True(JsonDocument.Parse(json).RootElement.GetProperty("dt_chosen_for_accuracy").GetBoolean());

        // Two-level relaxation (textbook first-order kinetics, e.g. Atkins' Physical Chemistry):
        // P_upper(t) = P_eq + (1 - P_eq) exp(-(k_down + k_up) t), k_up = k_down (g_u/g_g) exp(-dE/kT);
        // decks/two-level.toml: k_down = 2e3 /s, g = 1 and 3, dE / kT = 2, all population upper at t = 0.
        var kUp = 2e3 * 3 * Math.Exp(-2);
        var rate = 2e3 + kUp;
        var equilibriumUpper = kUp / rate;
        var worst = 0.0;
        foreach (var cells in Rows(folder.File($"populations-{method}.csv")))
        {
            var upper = equilibriumUpper + (1 - equilibriumUpper) * Math.Exp(-rate * cells[0]);
            worst = Math.Max(worst, Math.Max(Math.Abs(cells[2] - upper), Math.Abs(cells[1] - (1 - upper))));
        }

        Assert.True(worst <= target, $"{method}: worst difference from the closed form {worst} > {target}");
        Assert.True(worst > 0, "the explicit result cannot equal the exponential exactly");
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("euler")]
    [InlineData("rk4")]
    public void AutomaticStep_MeetsTheAccuracyTargetAgainstTheExactPropagatorOnTheCascadeDemo(string method)
    {
        using var folder = new TempFolder();
        var (code, json, error) = CliRunner.Run("run", CliRunner.DemoDeck("cascade.toml"), "--method", method, "--json", "--no-plots", "--out", folder.Path);
        Assert.True(code == ExitCodes.Success, error);

        // The exact propagator is checked against SciPy's expm elsewhere (ExpmFixtureTests); here the
        // explicit run at the chosen step must stay within run.accuracy (default 1e-3) of it.
        var root = JsonDocument.Parse(json).RootElement;
        var target = root.GetProperty("accuracy_target").GetDouble();
        Assert.Equal(1e-3, target);
        Assert.True(root.GetProperty("max_difference_relative_to_total").GetDouble() <= target);
        Assert.True(root.GetProperty("accuracy_met").GetBoolean());
        Assert.True(root.GetProperty("dt").GetDouble() <= root.GetProperty("dt_stability_limit").GetDouble());
    }

    [Trait("Through", "program")]
    [Fact]
    public void GivenStepThatMissesTheTarget_IsReportedAndFailsOnlyWhenAccuracyIsRequired()
    {
        using var folder = new TempFolder();

        // Forward Euler at 2.05e-6 s, half the stability limit 2/rho of decks/three-level.toml (the
        // old automatic step): its error is O(dt rho) and far above 1e-3 of the total early on.
        string[] args = ["run", CliRunner.DemoDeck("three-level.toml"), "--dt", "2.05e-6", "--no-plots", "--out", folder.Path];
        var (code, output, _) = CliRunner.Run(args);
        Assert.Equal(ExitCodes.Success, code);
        Assert.Contains("ACCURACY: explicit and exact differ by", output, StringComparison.Ordinal);
        Assert.Contains("above the accuracy target 1e-3 (run.accuracy)", output, StringComparison.Ordinal);

        var (jsonCode, json, _) = CliRunner.Run([.. args, "--json"]);
        Assert.Equal(ExitCodes.Success, jsonCode);
        Assert.False(JsonDocument.Parse(json).RootElement.GetProperty("accuracy_met").GetBoolean());

        var (required, _, error) = CliRunner.Run([.. args, "--require-accuracy"]);
        Assert.Equal(ExitCodes.CheckFailed, required);
        Assert.Contains("--require-accuracy", error, StringComparison.Ordinal);
    }

    private static IEnumerable<double[]> Rows(string path) =>
        File.ReadAllLines(path).Where(l => !l.StartsWith('#')).Skip(1).Select(l => l.Split(',').Select(c => double.Parse(c, CultureInfo.InvariantCulture)).ToArray());
}
