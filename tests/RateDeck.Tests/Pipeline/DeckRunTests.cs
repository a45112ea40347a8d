using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Tests.Cli;
using Xunit;

namespace RateDeck.Tests.Pipeline;

/// <summary>The engine's pipeline API used in process, as the fitter uses it: no console, no files, stages on demand.</summary>
public sealed class DeckRunTests
{
    // Two-level relaxation (textbook first-order kinetics, e.g. Atkins' Physical Chemistry):
    // P_upper(t) = P_eq + (1 - P_eq) exp(-(k_down + k_up) t), k_up = k_down (g_u/g_g) exp(-dE/kT).
    // Demo deck: k_down = 2e3 /s, g = 1 and 3, dE = 0.1 eV, kT = 0.05 eV, all population upper at t = 0.
    private static readonly double _kUp = 2e3 * 3 * Math.Exp(-2);

    private static double Upper(double t, double kT = 0.05)
    {
        const double kDown = 2e3;
        var kUp = kDown * 3 * Math.Exp(-0.1 / kT);
        var equilibrium = kUp / (kDown + kUp);
        return equilibrium + ((1 - equilibrium) * Math.Exp(-(kDown + kUp) * t));
    }

    private static LoadedDeck TwoLevel(params string[] overrides) =>
        DeckPipeline.Load(CliRunner.DemoDeck("two-level.toml"), overrides, new ManagedLinearAlgebra());

    [Fact]
    public void ExactOnly_AtCallerTimes_MatchesClosedFormWithoutExplicitTrajectory()
    {
        double[] times = [0, 1e-4, 3e-4, 2e-3];
        var run = new DeckRun(TwoLevel(), new RunOptions { ExactOnly = true, Times = times });

        Assert.Null(run.Explicit);
        Assert.Null(run.Difference);
        Assert.Equal(times, run.Exact.Times);
        for (var k = 0; k < times.Length; k++)
        {
            Assert.Equal(Upper(times[k]), run.Exact.Populations[k][1], 1e-12);
        }
    }

    [Fact]
    public void StepAboveStabilityLimit_IsRefusedUnlessAllowed()
    {
        var loaded = TwoLevel();
        // Forward Euler is stable for dt <= 2 / rho, rho = k_down + k_up here (textbook stability
        // region |1 + lambda dt| <= 1; Hairer and Wanner, Solving ODEs II, sec. IV.2).
        var limit = 2 / (2e3 + _kUp);
        var options = new RunOptions { Method = ExplicitMethod.Euler, Dt = 1.5 * limit };

        var refused = new DeckRun(loaded, options);
        Assert.False(refused.StepVerdict.Safe);
        Assert.Throws<UnsafeStepException>(() => refused.Explicit);

        var allowed = new DeckRun(loaded, options with { AllowUnsafeStep = true });
        Assert.NotNull(allowed.Explicit);
        Assert.Equal(limit, allowed.StabilityLimit, 1e-12 * limit);
    }

    [Fact]
    public void DeckWithChangedTemperature_GivesTheClosedFormAtThatTemperature()
    {
        // The fitter's loop in miniature: one DeckRun per trial deck.
        var run = new DeckRun(TwoLevel("temperature.kT=0.1"), new RunOptions { ExactOnly = true, Times = [0, 2e-4] });

        Assert.Equal(Upper(2e-4, kT: 0.1), run.Exact.Populations[1][1], 1e-12);
    }
}
