namespace RateDeck.Outputs;

/// <summary>How an axis of a plot is scaled.</summary>
public enum AxisScale
{
    /// <summary>Logarithmic when the data call for it (see <see cref="Plots"/>), otherwise linear.</summary>
    Auto,
    /// <summary>Always linear.</summary>
    Linear,
    /// <summary>Always logarithmic; zero and negative values are not drawn.</summary>
    Log,
}

/// <summary>The words on a plot. Axis labels should carry their unit, e.g. <c>time (ps)</c>.</summary>
/// <param name="Title">The title above the plot.</param>
/// <param name="XLabel">The horizontal axis label, with unit.</param>
/// <param name="YLabel">The vertical axis label, with unit.</param>
/// <param name="ValueLabel">The colour-bar label of a map (default <c>population</c>); unused elsewhere.</param>
public sealed record PlotText(string Title, string XLabel, string YLabel, string? ValueLabel = null);

/// <summary>Image size and axis scaling of a plot.</summary>
public sealed record PlotOptions
{
    /// <summary>The defaults: 1600 x 1000 pixels, both axes automatic, at most 20 decades shown.</summary>
    public static PlotOptions Default { get; } = new();

    /// <summary>Image width in pixels (at least 200). Text and lines scale with it.</summary>
    public int Width { get; init; } = 1600;

    /// <summary>Image height in pixels (at least 150).</summary>
    public int Height { get; init; } = 1000;

    /// <summary>Scaling of the horizontal axis.</summary>
    public AxisScale XScale { get; init; } = AxisScale.Auto;

    /// <summary>Scaling of the vertical axis.</summary>
    public AxisScale YScale { get; init; } = AxisScale.Auto;

    /// <summary>
    /// How many decades below the largest value a logarithmic value axis (or the colour scale of a
    /// map) reaches at most. Boltzmann tails can span hundreds of decades; showing them all would
    /// squash the part that matters into a line.
    /// </summary>
    public double MaxDecades { get; init; } = 20;

    /// <summary>The values not drawn as data, or null to draw every value a log axis can show.</summary>
    public PlotFloor? Floor { get; init; }
}

/// <summary>One state's population over time, exact and (optionally) explicit.</summary>
/// <param name="Label">The state label for the legend.</param>
/// <param name="Exact">The exact propagation at each output time, drawn as a line.</param>
/// <param name="Explicit">The explicit integration at the same times, drawn as markers; null when not run.</param>
public sealed record StateSeries(string Label, double[] Exact, double[]? Explicit = null);

/// <summary>A named curve over the states, e.g. the initial, final or steady-state distribution.</summary>
/// <param name="Label">The legend entry.</param>
/// <param name="Values">One value per state.</param>
public sealed record Curve(string Label, double[] Values);

/// <summary>
/// The resolution of plotted values: on a logarithmic value axis nothing below <paramref name="Value"/> is
/// drawn as data, and the legend says "not resolved below" it.
/// </summary>
/// <param name="Value">The smallest value drawn, in data units (&gt;= 0).</param>
public sealed record PlotFloor(double Value);

/// <summary>The inputs of a Boltzmann plot, one entry per state.</summary>
/// <param name="Label">The legend entry of the points, e.g. "final (exact), t = 100 s".</param>
/// <param name="Energies">E_i in the deck's energy unit.</param>
/// <param name="LogWeights">ln g_i.</param>
/// <param name="Populations">n_i.</param>
/// <param name="LogEquilibrium">ln pi_i of the normalised equilibrium at <paramref name="KT"/>.</param>
/// <param name="KT">kT in the energy unit.</param>
/// <param name="EnergyUnit">The energy unit's name for the legend; null or empty for model units.</param>
public sealed record BoltzmannPoints(string Label, double[] Energies, double[] LogWeights, double[] Populations, double[] LogEquilibrium, double KT, string? EnergyUnit);
