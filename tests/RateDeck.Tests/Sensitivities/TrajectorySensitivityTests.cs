using System.Text.Json;
using RateDeck.Decks;
using RateDeck.Pipeline;
using RateDeck.Propagation;
using RateDeck.Sensitivities;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Sensitivities;

/// <summary>
/// Analytic sensitivities dP_i(t)/d(theta) on the symmetric eigen path, for the cascade and the
/// pendulum demo decks and several kinds of free value (kT, a parameter in the energies, the
/// kernel, the losses or the pumping expression, a loss or pumping rate given per state):
/// against the SciPy reference of tests/reference/make_sensitivity_fixtures.py (the models
/// rebuilt from the deck files in NumPy, scipy.linalg.expm_frechet with complex-step dA; SciPy
/// 1.10.1, NumPy 1.24.2), and against central differences of the program's own trajectories
/// (a different computation: two propagations per value, no derivative formula). Tolerance from
/// the fitter's issue: 1e-6 relative, here of the largest sensitivity of that value over the
/// times and states compared.
/// </summary>
public sealed class TrajectorySensitivityTests
{
    private const double _tolerance = 1e-6;

    public static TheoryData<string, string> Cases() => new()
    {
        { "cascade.toml", "kT" },
        { "cascade.toml", "beta" },
        { "cascade.toml", "loss.k48" },
        { "cascade.toml", "pumping.k24" },
        { "pendulum-ladder.toml", "kT" },
        { "pendulum-ladder.toml", "z" },
        { "pendulum-ladder.toml", "alpha" },
        { "pendulum-ladder.toml", "k_esc" },
        { "pendulum-ladder.toml", "p0" },
    };

    [Theory]
    [MemberData(nameof(Cases))]
    public void AnalyticSensitivitiesMatchTheScipyReference(string deckName, string free)
    {
        var reference = Reference(deckName, free);
        var times = reference.GetProperty("times").EnumerateArray().Select(t => t.GetDouble()).ToArray();
        var states = reference.GetProperty("states").EnumerateArray().Select(s => s.GetString()!).ToArray();
        var expected = reference.GetProperty("derivative").EnumerateArray().Select(row => row.EnumerateArray().Select(v => v.GetDouble()).ToArray()).ToArray();
        var (deck, analytic) = Analytic(deckName, free, times);
        var columns = states.Select(s => Array.IndexOf(deck.Grid.Labels, s)).ToArray();
        Compare(expected, [.. analytic.Select(row => columns.Select(c => row[c]).ToArray())], $"{deckName} d/d{free} vs SciPy");
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void AnalyticSensitivitiesMatchCentralDifferences(string deckName, string free)
    {
        var path = DeckPath(deckName);
        var deck = DeckReader.Read(path, []);
        var times = RunSetup.OutputTimes(deck.Run);
        var (_, analytic) = Analytic(deckName, free, times);
        var value = Read(deck, free);
        // Central differences, step eps^(1/3) |theta| (truncation h^2 against rounding eps / h; common practice).
        var h = Math.Cbrt(2.220446049250313e-16) * Math.Abs(value);
        var plus = Trajectory(deck.With(Override(free, value + h)), times);
        var minus = Trajectory(deck.With(Override(free, value - h)), times);
        var differences = plus.Select((row, k) => row.Select((p, i) => (p - minus[k][i]) / (2 * h)).ToArray()).ToArray();
        Compare(differences, analytic, $"{deckName} d/d{free} vs central differences");
    }

    private static (Deck Deck, double[][] Derivative) Analytic(string deckName, string free, double[] times)
    {
        var loaded = DeckPipeline.Load(DeckPath(deckName), [], TestProvider.Selected);
        var run = new DeckRun(loaded, new RunOptions { Times = times, ExactOnly = true, ExactPath = ExactPathRequest.SymmetricEigen });
        var change = GeneratorDerivatives.Of(loaded, Input(loaded.Deck, free));
        var propagator = Assert.IsType<SymmetricEigenPropagator>(run.ExactPropagator);
        return (loaded.Deck, TrajectorySensitivity.Compute(propagator, loaded.Rates, run.Initial, times, [change], TestProvider.Selected)[0]);
    }

    private static double[][] Trajectory(Deck deck, double[] times)
    {
        var run = new DeckRun(DeckPipeline.Assemble(deck, TestProvider.Selected), new RunOptions { Times = times, ExactOnly = true, ExactPath = ExactPathRequest.SymmetricEigen });
        return run.Exact.Populations;
    }

    private static void Compare(double[][] expected, double[][] actual, string what)
    {
        var scale = expected.SelectMany(r => r).Max(Math.Abs);
        Assert.True(scale > 0, $"{what}: the reference sensitivity is identically zero");
        var worst = expected.SelectMany((row, k) => row.Select((e, i) => Math.Abs(actual[k][i] - e))).Max() / scale;
        Assert.True(worst <= _tolerance, $"{what}: largest difference {worst:G3} of the largest sensitivity {scale:G3} (> {_tolerance:G1})");
    }

    private static SensitivityInput Input(Deck deck, string free) => free switch
    {
        "kT" => new SensitivityInput(SensitivityKind.Temperature),
        _ when free.StartsWith("loss.", StringComparison.Ordinal) => new SensitivityInput(SensitivityKind.StateLoss, Index: Array.IndexOf(deck.Grid.Labels, free[5..])),
        _ when free.StartsWith("pumping.", StringComparison.Ordinal) => new SensitivityInput(SensitivityKind.StatePumping, Index: Array.IndexOf(deck.Grid.Labels, free[8..])),
        _ => new SensitivityInput(SensitivityKind.Parameter, free),
    };

    private static double Read(Deck deck, string free) => free switch
    {
        "kT" => deck.KT,
        _ when free.StartsWith("loss.", StringComparison.Ordinal) => ((PerStateValues)deck.Losses!).Values[Array.IndexOf(deck.Grid.Labels, free[5..])],
        _ when free.StartsWith("pumping.", StringComparison.Ordinal) => ((PerStateValues)deck.Pumping!).Values[Array.IndexOf(deck.Grid.Labels, free[8..])],
        _ => deck.Parameters[free].Value,
    };

    private static DeckOverride Override(string free, double value) => free switch
    {
        "kT" => DeckOverride.KT(value),
        _ when free.StartsWith("loss.", StringComparison.Ordinal) => DeckOverride.Set("losses.by_state." + free[5..], value),
        _ when free.StartsWith("pumping.", StringComparison.Ordinal) => DeckOverride.Set("pumping.by_state." + free[8..], value),
        _ => DeckOverride.Parameter(free, value),
    };

    private static string DeckPath(string name) => Path.Combine(AppContext.BaseDirectory, "decks", name);

    private static JsonElement Reference(string deck, string free)
    {
        using var document = JsonDocument.Parse(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "fixtures", "sensitivities.json")));
        return document.RootElement.GetProperty("decks").GetProperty(deck).GetProperty(free).Clone();
    }
}
