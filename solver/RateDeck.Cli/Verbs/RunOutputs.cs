using RateDeck.Decks;
using RateDeck.Diagnostics;
using RateDeck.Outputs;
using RateDeck.Pipeline;
using RateDeck.Propagation;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// The files of a run, staged in a <see cref="StagedOutputFolder"/> so that they enter the folder all
/// together or not at all: populations of both methods, their differences, the spectrum, the steady
/// state, the one-row table of scalar results (<see cref="RunResultsFile"/>), and the plots.
/// </summary>
internal sealed class RunOutputs(LoadedDeck loaded, string folder, DeckRun run)
{
    private const int _defaultPlottedStates = 5;
    private readonly OutputHeader _header = OutputHeader.For(loaded.Deck);
    private StagedOutputFolder? _staging;

    /// <summary>Why the plots asked for were not drawn (no font), or null.</summary>
    public string? PlotsRefused { get; private set; }

    /// <summary>Writes every output and returns the file names, in the order written.</summary>
    public IReadOnlyList<string> Write(Trajectory exact, Trajectory? explicitResult, Spectrum spectrum, StiffnessReport limits,
        SteadyStateResult steady, double dt, ExplicitMethod method, bool plots, bool writeRates = false)
    {
        using var staging = _staging = StagedOutputFolder.Begin(folder);
        var deck = loaded.Deck;
        var labels = loaded.States.Labels;
        WriteFile("populations-exact.csv", path => ResultCsv.WriteTrajectory(path, _header, labels, exact, deck.TimeUnit));
        if (explicitResult is not null)
        {
            WriteFile($"populations-{VerbSupport.MethodName(method)}.csv", path => ResultCsv.WriteTrajectory(path, _header, labels, explicitResult, deck.TimeUnit));
            WriteFile("differences.csv", path => ResultCsv.WriteDifferences(path, _header, labels, exact, explicitResult, deck.TimeUnit));
        }

        WriteFile("spectrum.csv", path => ResultCsv.WriteSpectrum(path, _header, spectrum.Values, deck.TimeUnit, spectrum.ZeroTolerance));
        if (steady.Populations is { } steadyPopulations)
        {
            WriteFile("steady-state.csv", path => ResultCsv.WriteSteadyState(path, _header, labels, loaded.States.Coordinates, steadyPopulations, loaded.States.LogEquilibrium));
        }

        if (loaded.Deck.EquilibriumGiven.HasFlag(EquilibriumGiven.Energies))
        {
            WriteFile("boltzmann-final.csv", path => ResultCsv.WriteBoltzmannTable(path, _header, loaded.States, exact.Populations[^1], EnergyUnits.Name(deck.EnergyUnit)));
        }

        if (writeRates)
        {
            WriteFile("rate-matrix.csv", path => ResultCsv.WriteRateMatrix(path, _header, loaded.Rates, deck.TimeUnit));
        }

        WriteFile(RunResultsFile.Name, path => RunResultsFile.Write(path, _header, run));
        PlotsRefused = plots ? Plots.Unavailable : null;
        if (plots && PlotsRefused is null)
        {
            WritePlots(exact, explicitResult, spectrum, limits, steady, dt, method);
        }

        staging.Commit();
        return staging.Written;
    }

    private void WritePlots(Trajectory exact, Trajectory? explicitResult, Spectrum spectrum, StiffnessReport limits,
        SteadyStateResult steady, double dt, ExplicitMethod method)
    {
        var deck = loaded.Deck;
        var states = loaded.States;
        var time = $"time ({deck.TimeUnit})";
        var chosen = PlottedStates(deck.Run.PlotStates, states.Count);
        var series = chosen.Select(i => new StateSeries(
            states.Labels[i],
            exact.Populations.Select(p => p[i]).ToArray(),
            explicitResult?.Populations.Select(p => p[i]).ToArray())).ToList();
        var methodName = VerbSupport.MethodName(method);
        WriteFile("populations.png", path => Plots.PopulationsOverTime(path, new PlotText($"{deck.Title}: populations", time, "population"),
            exact.Times, series, explicitName: $"{methodName}, dt = {Text.Format.Number(dt)}"));
        WriteFile("population-map.png", path => Plots.PopulationMap(path, new PlotText($"{deck.Title}: population map", time, "state coordinate", "log10 population"),
            exact.Times, states.Coordinates, exact.Populations));
        var limitLines = new List<RateLimitLine> { RateLimitLine.ForwardEuler(limits.EulerStable.MaxStep), RateLimitLine.RungeKutta4(limits.Rk4Stable.MaxStep) };
        if (explicitResult is not null)
        {
            limitLines.Add(new RateLimitLine($"chosen dt = {Text.Format.Number(dt)}", (method == ExplicitMethod.Euler ? 2.0 : StepLimits.Rk4RealAxisLimit) / dt));
        }

        WriteFile("spectrum.png", path => Plots.Spectrum(path, new PlotText($"{deck.Title}: spectrum of K", "mode (sorted)", $"|eigenvalue| (1/{deck.TimeUnit})"),
            spectrum.Values.Select(v => v.Magnitude).ToArray(), limitLines, spectrum.ZeroTolerance));
        var curves = new List<Curve> { new("initial", exact.Populations[0]), new("final (exact)", exact.Populations[^1]) };
        if (steady.Populations is { } steadyPopulations)
        {
            curves.Add(new Curve("steady state", steadyPopulations));
        }

        WriteFile("distributions.png", path => Plots.Distributions(path, new PlotText($"{deck.Title}: distributions", "state coordinate", "population"),
            states.Coordinates, curves));
    }

    /// <summary>The deck's plot_states, or up to five states spread evenly over the grid.</summary>
    private static int[] PlottedStates(IReadOnlyList<int> requested, int count)
    {
        if (requested.Count > 0)
        {
            return [.. requested];
        }

        var shown = Math.Min(count, _defaultPlottedStates);
        return [.. Enumerable.Range(0, shown).Select(k => shown == 1 ? 0 : (int)Math.Round(k * (count - 1.0) / (shown - 1))).Distinct()];
    }

    private void WriteFile(string name, Action<string> write) => write(_staging!.PathOf(name));
}
