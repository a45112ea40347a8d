using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.States;
using static RateDeck.Text.Format;

namespace RateDeck.Outputs;

/// <summary>The results of one run that its plots show.</summary>
/// <param name="Exact">The exact trajectory.</param>
/// <param name="Explicit">The explicit trajectory at the same times, or null when it was not run.</param>
/// <param name="Eigenvalues">The spectrum of K.</param>
/// <param name="ZeroTolerance">|lambda| at or below which a mode is zero.</param>
/// <param name="Steady">The steady state, or null when there is none.</param>
/// <param name="Dt">The explicit step chosen (or the one the explicit method would have taken).</param>
/// <param name="MethodName">The explicit method's name, e.g. "rk4".</param>
public sealed record RunResults(Trajectory Exact, Trajectory? Explicit, IReadOnlyList<System.Numerics.Complex> Eigenvalues, double ZeroTolerance,
    double[]? Steady, double Dt, string MethodName)
{
    /// <summary>For a partial spectrum, each eigenvalue's mode number (from 1, ascending order of all N, as in spectrum.csv); null when <see cref="Eigenvalues"/> holds them all.</summary>
    public IReadOnlyList<int>? ModeNumbers { get; init; }

    /// <summary>N, the number of modes of K, computed or not.</summary>
    public int ModeCount { get; init; }

    /// <summary>For a partial spectrum, which modes <see cref="Eigenvalues"/> holds (one line); null when it holds them all.</summary>
    public string? Coverage { get; init; }
}

/// <summary>
/// The plots of a run, with their words and scales taken from the deck: the time axis is labelled
/// with the deck's time unit, the state axis with <c>states.coordinate_name</c> and
/// <c>states.coordinate_unit</c>; each axis is logarithmic or linear as its grid is spaced (a log
/// output grid or state grid gives a log axis), detected from the values for listed coordinates or
/// times, and <c>plot.time_axis</c> / <c>plot.state_axis</c> override that. Populations below the
/// propagator's resolution (<see cref="Precision.PopulationResolution"/> of the run's largest total)
/// are not drawn as data.
/// </summary>
public static class RunPlots
{
    /// <summary>At most this many states are drawn against time when the deck names none; fewer states are all drawn.</summary>
    public const int DefaultPlottedStates = 8;

    /// <summary>The state axis label: the coordinate's name (default "state coordinate") and its unit in parentheses.</summary>
    public static string StateAxisLabel(PlotSpec plot)
    {
        ArgumentNullException.ThrowIfNull(plot);
        var name = plot.CoordinateName ?? "state coordinate";
        return plot.CoordinateUnit is { } unit ? $"{name} ({unit})" : name;
    }

    /// <summary>The time axis label, with the deck's time unit.</summary>
    public static string TimeAxisLabel(Deck deck)
    {
        ArgumentNullException.ThrowIfNull(deck);
        return $"time ({deck.TimeUnit})";
    }

    /// <summary>The time axis scale: plot.time_axis, else the output grid's spacing, else (listed times) detected from the values.</summary>
    public static AxisScale TimeScale(Deck deck)
    {
        ArgumentNullException.ThrowIfNull(deck);
        if (deck.Plot.TimeAxis is { } chosen)
        {
            return Scale(chosen);
        }

        return deck.Run.ListedTimes is not null ? AxisScale.Auto
            : deck.Run.Spacing == OutputSpacing.Logarithmic ? AxisScale.Log : AxisScale.Linear;
    }

    /// <summary>The state axis scale: plot.state_axis, else the state grid's spacing, else (listed coordinates) detected from the values.</summary>
    public static AxisScale StateScale(Deck deck)
    {
        ArgumentNullException.ThrowIfNull(deck);
        return deck.Plot.StateAxis is { } chosen ? Scale(chosen)
            : deck.Grid.Spacing is { } spacing ? Scale(spacing) : AxisScale.Auto;
    }

    /// <summary>
    /// The resolution floor of a run: <see cref="Precision.PopulationResolution"/> of the largest
    /// total population over the exact trajectory.
    /// </summary>
    public static PlotFloor Floor(Trajectory exact)
    {
        ArgumentNullException.ThrowIfNull(exact);
        var largest = exact.Populations.Select(p => p.Where(double.IsFinite).Sum(Math.Abs)).DefaultIfEmpty(0).Max();
        return new PlotFloor(Precision.PopulationResolution(largest));
    }

    /// <summary>The states drawn against time: the deck's plot_states, or all states up to <see cref="DefaultPlottedStates"/>, or five spread evenly over the grid.</summary>
    public static int[] PlottedStates(IReadOnlyList<int> requested, int count)
    {
        ArgumentNullException.ThrowIfNull(requested);
        if (requested.Count > 0)
        {
            return [.. requested];
        }

        if (count <= DefaultPlottedStates)
        {
            return [.. Enumerable.Range(0, count)];
        }

        const int shown = 5;
        return [.. Enumerable.Range(0, shown).Select(k => (int)Math.Round(k * (count - 1.0) / (shown - 1))).Distinct()];
    }

    /// <summary>
    /// The plot files of a run, by file name, each with the function that writes it to a path:
    /// populations, population map, spectrum against the stability intervals, distributions, and
    /// the Boltzmann plot where the deck gives energies.
    /// </summary>
    public static IReadOnlyList<(string Name, Action<string> Write)> Files(Deck deck, StateSpace states, RunResults results)
    {
        ArgumentNullException.ThrowIfNull(deck);
        ArgumentNullException.ThrowIfNull(states);
        ArgumentNullException.ThrowIfNull(results);
        var exact = results.Exact;
        var mapOptions = new PlotOptions { XScale = TimeScale(deck), YScale = StateScale(deck), Floor = Floor(exact) };
        var files = new List<(string, Action<string>)>
        {
            ("populations.png", path => PopulationsModel(deck, states, results).Render(path, PlotOptions.Default)),
            ("population-map.png", path => Plots.PopulationMap(path, new PlotText($"{deck.Title}: population map", TimeAxisLabel(deck), StateAxisLabel(deck.Plot), "population"),
                exact.Times, states.Coordinates, exact.Populations, mapOptions)),
            ("spectrum.png", path => SpectrumModel(deck, results).Render(path, PlotOptions.Default)),
            ("distributions.png", path => DistributionsModel(deck, states, results).Render(path, PlotOptions.Default)),
        };
        if (BoltzmannModel(deck, states, results) is { } boltzmann)
        {
            files.Add(("boltzmann.png", path => boltzmann.Render(path, PlotOptions.Default)));
        }

        return files;
    }

    /// <summary>Populations of the plotted states against time, exact and explicit, above the resolution floor.</summary>
    internal static PlotModel PopulationsModel(Deck deck, StateSpace states, RunResults results)
    {
        var exact = results.Exact;
        var series = PlottedStates(deck.Run.PlotStates, states.Count).Select(i => new StateSeries(
            states.Labels[i],
            exact.Populations.Select(p => p[i]).ToArray(),
            results.Explicit?.Populations.Select(p => p[i]).ToArray())).ToList();
        return Plots.PopulationsModel(new PlotText($"{deck.Title}: populations", TimeAxisLabel(deck), "population"), exact.Times, series,
            new PlotOptions { XScale = TimeScale(deck), Floor = Floor(exact) }, explicitName: $"{results.MethodName}, dt = {Number(results.Dt)} {deck.TimeUnit}");
    }

    /// <summary>
    /// Each mode's |lambda dt| at the run's step against the Euler and RK4 stability intervals; a
    /// partial spectrum (real, non-positive: the symmetric path) is drawn at its modes' places among all
    /// N by |lambda|, N + 1 minus the mode number, titled and noted as partial.
    /// </summary>
    internal static PlotModel SpectrumModel(Deck deck, RunResults results)
    {
        var places = results.Coverage is null ? null : results.ModeNumbers?.Select(m => results.ModeCount + 1 - m).ToArray();
        var title = $"{deck.Title}: modes against the explicit stability intervals{(results.Coverage is null ? "" : " (extremes only)")}";
        return Plots.SpectrumModel(
            new PlotText(title, "mode (sorted by |λ|)", $"|λ·dt| at dt = {Number(results.Dt)} {deck.TimeUnit}"),
            results.Eigenvalues, results.Dt, results.ZeroTolerance, PlotOptions.Default, places, results.Coverage is null ? null : $"extremes only: {results.Eigenvalues.Count} of {results.ModeCount} modes (spectrum.csv says which)");
    }

    /// <summary>Initial, final and steady-state distributions against the state coordinate.</summary>
    internal static PlotModel DistributionsModel(Deck deck, StateSpace states, RunResults results)
    {
        var exact = results.Exact;
        var curves = new List<Curve> { new("initial", exact.Populations[0]), new(FinalLabel(deck, exact), exact.Populations[^1]) };
        if (results.Steady is { } steady)
        {
            curves.Add(new Curve("steady state", steady));
        }

        return Plots.DistributionsModel(new PlotText($"{deck.Title}: distributions", StateAxisLabel(deck.Plot), "population"), states.Coordinates, curves,
            new PlotOptions { XScale = StateScale(deck), Floor = Floor(exact) });
    }

    /// <summary>ln(n_i / g_i) against E_i at the end of the run with the equilibrium line; null when the deck gives no energies.</summary>
    internal static PlotModel? BoltzmannModel(Deck deck, StateSpace states, RunResults results)
    {
        if (!deck.EquilibriumGiven.HasFlag(EquilibriumGiven.Energies))
        {
            return null;
        }

        var exact = results.Exact;
        var unit = EnergyUnits.Name(deck.EnergyUnit);
        var energyUnit = unit == "none" ? null : unit;
        var points = new BoltzmannPoints(FinalLabel(deck, exact), states.Energies, states.LogWeights, exact.Populations[^1], states.LogEquilibrium, states.KT, energyUnit);
        return Plots.BoltzmannModel(
            new PlotText($"{deck.Title}: Boltzmann plot at the end of the run", energyUnit is null ? "energy E_i (model units)" : $"energy E_i ({energyUnit})", "ln(n_i / g_i)"),
            points, new PlotOptions { Floor = Floor(exact) });
    }

    private static string FinalLabel(Deck deck, Trajectory exact) => $"final (exact), t = {Number(exact.Times[^1])} {deck.TimeUnit}";

    private static AxisScale Scale(GridSpacing spacing) => spacing == GridSpacing.Logarithmic ? AxisScale.Log : AxisScale.Linear;
}
