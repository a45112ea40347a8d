using System.Globalization;
using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>The run and steady verbs end to end on the demo decks.</summary>
public sealed class RunVerbTests
{
    [Trait("Through", "program")]
    [Fact]
    public void Run_OnTwoLevelDeck_AgreesWithClosedFormAndWritesEveryOutput()
    {
        using var folder = new TempFolder();
        var (code, output, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--json", "--out", folder.Path);

        Assert.True(code == ExitCodes.Success, error);
        var root = JsonDocument.Parse(output).RootElement;
        foreach (var key in new[] { "propagator", "explicit_method", "dt", "max_abs_difference", "max_rel_difference", "steady_state_distance" })
        {
            Assert.True(root.TryGetProperty(key, out _), $"missing key {key}");
        }

        Assert.Equal("symmetric-eigen", root.GetProperty("propagator").GetString());
        // RK4 at half its stability limit: the global error is O(dt^4) and stays far below 1e-3 (common practice).
        Assert.True(root.GetProperty("max_abs_difference").GetDouble() < 1e-3);
        foreach (var name in new[] { "populations-exact.csv", "populations-rk4.csv", "differences.csv", "spectrum.csv", "steady-state.csv", "populations.png", "population-map.png", "spectrum.png", "distributions.png" })
        {
            Assert.True(File.Exists(folder.File(name)), name);
        }

        Assert.Empty(Directory.GetFiles(folder.Path, "*.tmp*"));

        // Two-level relaxation (textbook first-order kinetics, e.g. Atkins' Physical Chemistry):
        // P_upper(t) = P_eq + (1 - P_eq) exp(-(k_down + k_up) t), k_up = k_down (g_u/g_g) exp(-dE/kT).
        // Deck: k_down = 2e3 /s, g = 1 and 3, dE = 0.1 eV, kT = 0.05 eV, all population upper at t = 0.
        var kUp = 2e3 * 3 * Math.Exp(-2);
        var rate = 2e3 + kUp;
        var equilibriumUpper = kUp / rate;
        var lines = File.ReadAllLines(folder.File("populations-exact.csv")).Where(l => !l.StartsWith('#')).Skip(1);
        foreach (var line in lines)
        {
            var cells = line.Split(',').Select(c => double.Parse(c, CultureInfo.InvariantCulture)).ToArray();
            var expected = equilibriumUpper + (1 - equilibriumUpper) * Math.Exp(-rate * cells[0]);
            Assert.Equal(expected, cells[2], 1e-12);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_WithStepAboveStabilityLimit_IsRefusedWithExitThreeAndWritesNothing()
    {
        using var folder = new TempFolder();
        var output = Path.Combine(folder.Path, "out");

        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("cascade.toml"), "--dt", "0.05", "--out", output);

        Assert.Equal(ExitCodes.UnsafeTimeStep, code);
        Assert.Contains("stability limit", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(output));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_WithAllowUnstable_RunsTheUnstableStepAndShowsItDiverge()
    {
        using var folder = new TempFolder();
        // Forward Euler with dt = t_end / 4 = 1.25e-3 on four linear outputs (every step lands on
        // an output, none is shortened): dt rho = 3.5 multiplies the fast mode by |1 - 3.5| = 2.5 per
        // step, about 40 after four (textbook stability region of forward Euler, |1 + lambda dt| <= 1).
        var (_, json, _) = CliRunner.Run("stiffness", CliRunner.DemoDeck("two-level.toml"), "--json");
        var limit = JsonDocument.Parse(json).RootElement.GetProperty("dt_euler_stable").GetDouble();
        const string dt = "0.00125";
        Assert.True(double.Parse(dt, CultureInfo.InvariantCulture) > 1.5 * limit);

        var (code, output, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--method", "euler", "--dt", dt, "--allow-unstable",
            "--set", "run.outputs=4", "--set", "run.spacing=linear", "--json", "--no-plots", "--out", folder.Path);

        Assert.True(code == ExitCodes.Success, error);
        Assert.True(JsonDocument.Parse(output).RootElement.GetProperty("max_abs_difference").GetDouble() > 1);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_OnPumpedCascade_ReachesTheDrivenSteadyState()
    {
        using var folder = new TempFolder();
        var (code, output, error) = CliRunner.Run("run", CliRunner.DemoDeck("cascade.toml"), "--json", "--no-plots", "--out", folder.Path);

        Assert.True(code == ExitCodes.Success, error);
        var root = JsonDocument.Parse(output).RootElement;
        Assert.Equal("driven", root.GetProperty("steady_state").GetString());
        // t_end = 100 is about 13 approach times (1/slowest rate = 7.8): exp(-12.8) ~ 3e-6 bounds the distance.
        Assert.True(root.GetProperty("steady_state_distance").GetDouble() < 1e-5);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Steady_OnThreeLevelDeck_IsTheBoltzmannDistribution()
    {
        using var folder = new TempFolder();
        var (code, output, error) = CliRunner.Run("steady", CliRunner.DemoDeck("three-level.toml"), "--json", "--out", folder.Path);

        Assert.True(code == ExitCodes.Success, error);
        var root = JsonDocument.Parse(output).RootElement;
        var populations = root.GetProperty("populations").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        Assert.Equal(1.0, populations.Sum(), 1e-12);
        Assert.True(File.Exists(folder.File("steady-state.csv")));

        // Boltzmann law p_i = g_i exp(-E_i/kT) / Z; deck: E = 0, 450, 1200 cm-1, g = 1, 3, 5, T = 600 K;
        // kT = T k_B/(h c) with k_B/(h c) = 0.695034800 cm-1/K (CODATA 2018, derived from exact constants).
        var kT = 600 * 0.695034800;
        double[] energies = [0, 450, 1200];
        double[] weights = [1, 3, 5];
        var boltzmann = energies.Select((e, i) => weights[i] * Math.Exp(-e / kT)).ToArray();
        var z = boltzmann.Sum();
        for (var i = 0; i < 3; i++)
        {
            Assert.Equal(boltzmann[i] / z, populations[i], 1e-8);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_WithTFirstRemoved_WritesTheLinearGridTheOverridesAskFor()
    {
        using var folder = new TempFolder();
        var deck = CliRunner.DemoDeck("three-level.toml");
        var (refused, _, message) = CliRunner.Run("run", deck, "--set", "run.spacing=linear", "--out", folder.File("refused"), "--no-plots");
        Assert.Equal(ExitCodes.BadInput, refused);
        Assert.Contains("remove it", message, StringComparison.Ordinal);

        var (code, _, error) = CliRunner.Run(
            "run", deck, "--set", "run.spacing=linear", "--set", "remove:run.t_first", "--set", "run.outputs=4", "--out", folder.File("out"), "--no-plots");

        Assert.True(code == ExitCodes.Success, error);
        var lines = File.ReadAllLines(Path.Combine(folder.File("out"), "populations-exact.csv"));
        Assert.Contains(lines, l => l.StartsWith('#') && l.Contains("remove:run.t_first", StringComparison.Ordinal));
        var times = lines.Where(l => !l.StartsWith('#')).Skip(1).Select(l => double.Parse(l.Split(',')[0], CultureInfo.InvariantCulture)).ToArray();

        // The deck's t_end = 1e-4 s in four equal steps (to rounding of k t_end / 4).
        double[] expected = [0.0, 2.5e-5, 5e-5, 7.5e-5, 1e-4];
        Assert.Equal(expected.Length, times.Length);
        Assert.All(expected.Zip(times), pair => Assert.Equal(pair.First, pair.Second, 1e-19));
    }
}
