using ScottPlot;
using static RateDeck.Outputs.PlotCanvas;

namespace RateDeck.Outputs;

/// <summary>
/// PNG plots of results, made to be read on paper: large text, axis labels with units, and
/// logarithmic axes where the data span decades. The functions take plain arrays and labels, not
/// solver objects, and write through <see cref="AtomicFile"/>.
/// <para>
/// Automatic scaling (<see cref="AxisScale.Auto"/>): a grid axis (time, state coordinate) is
/// logarithmic when its positive values span two decades or more and half of them lie below a
/// tenth of the largest, as on a geometric grid; a value axis (population, |lambda|) is
/// logarithmic when its positive values span three decades or more. Either stays linear when a
/// value is clearly negative (beyond 1e-12 of the largest magnitude, i.e. more than rounding), so an
/// unstable explicit run is shown as it is. A log axis drops zeros (t = 0, an empty state) and
/// reaches at most <see cref="PlotOptions.MaxDecades"/> below its largest value.
/// </para>
/// <para>
/// Text needs a font: the plots use <see cref="FontFamily"/>. On a Debian machine without fonts,
/// install <c>fonts-dejavu-core</c>; without a font no plot is drawn (<see cref="Unavailable"/> says why),
/// never a plot without text.
/// </para>
/// </summary>
public static class Plots
{
    private const int _maxMarkersPerSeries = 60;

    private static readonly MarkerShape[] _shapes =
        [MarkerShape.FilledCircle, MarkerShape.FilledSquare, MarkerShape.FilledTriangleUp, MarkerShape.FilledDiamond, MarkerShape.FilledTriangleDown];

    /// <summary>
    /// The font family the plots use: DejaVu Sans when installed, else the first family the
    /// system offers; null when no font is installed at all (the images then carry no text).
    /// </summary>
    public static string? FontFamily => PlotCanvas.FontFamily;

    /// <summary>Why plots cannot be drawn on this machine (one line naming the package to install); null when a font exists.</summary>
    public static string? Unavailable => FontProblem(FontFamily);

    /// <summary>
    /// The refusal for the font family found (null: none): a plot without a font would carry no
    /// title, axis label, tick or legend, so it is not drawn at all.
    /// </summary>
    public static string? FontProblem(string? family) => family is null
        ? "plots not drawn: no font is installed to put text on them; install one (Debian: apt-get install fonts-dejavu-core) or pass --no-plots"
        : null;

    /// <summary>
    /// Populations against time for chosen states: the exact result as a line, the explicit one as
    /// open markers of the same colour (thinned to at most 60 per state for legibility; the CSV
    /// has every point). <paramref name="exactName"/> and <paramref name="explicitName"/> name the
    /// two methods in the legend.
    /// </summary>
    public static void PopulationsOverTime(string path, PlotText text, double[] times, IReadOnlyList<StateSeries> series,
        PlotOptions? options = null, string exactName = "exact", string explicitName = "explicit")
    {
        ArgumentNullException.ThrowIfNull(times);
        ArgumentNullException.ThrowIfNull(series);
        foreach (var s in series)
        {
            RequireLength(s.Exact, times.Length, $"exact values of '{s.Label}'");
            if (s.Explicit is not null)
            {
                RequireLength(s.Explicit, times.Length, $"explicit values of '{s.Label}'");
            }
        }
        options ??= PlotOptions.Default;
        using var plot = Create(text, options);
        var x = PlotAxis.ForGrid(options.XScale, times);
        var y = PlotAxis.ForMagnitudes(options.YScale, series.SelectMany(s => s.Exact.Concat(s.Explicit ?? [])));
        var legend = new List<LegendItem>();
        var drawn = new List<Coordinates>();
        for (var k = 0; k < series.Count; k++)
        {
            var (color, pattern) = Style(k);
            var (lx, ly) = PlotAxis.MapPoints(x, y, times, series[k].Exact);
            var line = plot.Add.ScatterLine(lx, ly, color);
            line.LineWidth = LineWidth;
            line.LinePattern = pattern;
            AddLinePoints(drawn, lx, ly);
            if (series[k].Explicit is { } explicitValues)
            {
                var (mx, my) = PlotAxis.MapPoints(x, y, times, explicitValues);
                var stride = Math.Max(1, (int)Math.Ceiling(mx.Length / (double)_maxMarkersPerSeries));
                mx = mx.Where((_, i) => i % stride == 0).ToArray();
                my = my.Where((_, i) => i % stride == 0).ToArray();
                var markers = plot.Add.Markers(mx, my, MarkerShape.OpenCircle, MarkerSize, color);
                markers.MarkerLineWidth = 2;
                drawn.AddRange(mx.Select((v, i) => new Coordinates(v, my[i])));
            }
            legend.Add(new LegendItem { LabelText = series[k].Label, LineColor = color, LineWidth = LineWidth, LinePattern = pattern });
        }
        if (series.Any(s => s.Explicit is not null))
        {
            legend.Add(new LegendItem { LabelText = $"line: {exactName}", LineColor = Colors.Black, LineWidth = LineWidth });
            legend.Add(new LegendItem
            {
                LabelText = $"marker: {explicitName}",
                LineWidth = 0,
                MarkerShape = MarkerShape.OpenCircle,
                MarkerSize = MarkerSize,
                MarkerLineColor = Colors.Black,
                MarkerLineWidth = 2,
            });
        }
        FinishAxes(plot, x, y, drawn, options.MaxDecades);
        PlaceLegend(plot, legend, drawn, options);
        Save(plot, path, options);
    }

    /// <summary>
    /// A state-by-time map: colour is log10 of the population, time runs along the horizontal
    /// axis, the state (by <paramref name="stateAxis"/>: coordinates, or indices 0..N-1) along
    /// the vertical one. <c>populations[k][i]</c> is state i at <c>times[k]</c>; both axes must be
    /// strictly ascending. Zero and negative populations are left white, as a log scale has no
    /// colour for them. The colour scale spans at most <see cref="PlotOptions.MaxDecades"/>; lower
    /// values take the lowest colour.
    /// </summary>
    public static void PopulationMap(string path, PlotText text, double[] times, double[] stateAxis, double[][] populations, PlotOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(times);
        ArgumentNullException.ThrowIfNull(stateAxis);
        ArgumentNullException.ThrowIfNull(populations);
        RequireLength(populations, times.Length, "population rows");
        foreach (var row in populations)
        {
            RequireLength(row, stateAxis.Length, "populations in a row");
        }
        options ??= PlotOptions.Default;
        using var plot = Create(text, options);
        var x = PlotAxis.ForGrid(options.XScale, times);
        var y = PlotAxis.ForGrid(options.YScale, stateAxis);
        var columns = DrawableIndices(x, times);
        var rows = DrawableIndices(y, stateAxis);
        var xCells = MapCells.For(columns.Select(k => x.Map(times[k])!.Value).ToArray(), "times");
        var yCells = MapCells.For(rows.Select(i => y.Map(stateAxis[i])!.Value).ToArray(), "state coordinates");

        var intensities = new double[yCells.Owners.Length, xCells.Owners.Length];
        var range = (Low: double.PositiveInfinity, High: double.NegativeInfinity);
        var blank = false;
        for (var r = 0; r < yCells.Owners.Length; r++)
        {
            // Row 0 of a ScottPlot heat map is drawn at the top, where the largest coordinate belongs.
            var state = rows[yCells.Owners[^(r + 1)]];
            for (var c = 0; c < xCells.Owners.Length; c++)
            {
                var p = populations[columns[xCells.Owners[c]]][state];
                var value = p > 0 && double.IsFinite(p) ? Math.Log10(p) : double.NaN;
                intensities[r, c] = value;
                blank |= double.IsNaN(value);
                if (!double.IsNaN(value))
                {
                    range = (Math.Min(range.Low, value), Math.Max(range.High, value));
                }
            }
        }
        var heatmap = plot.Add.Heatmap(intensities);
        heatmap.Extent = new CoordinateRect(xCells.Low, xCells.High, yCells.Low, yCells.High);
        heatmap.Colormap = new ScottPlot.Colormaps.Viridis();
        heatmap.NaNCellColor = Colors.White;
        if (double.IsFinite(range.High))
        {
            var low = Math.Max(range.Low, range.High - options.MaxDecades);
            heatmap.ManualRange = new ScottPlot.Range(low < range.High ? low : range.High - 1, range.High);
        }
        var colorBar = plot.Add.ColorBar(heatmap);
        colorBar.Label = (text.ValueLabel ?? "population") + (blank ? " (white: ≤ 0)" : "");
        StyleLabel(colorBar.LabelStyle);
        StyleTicks(colorBar.Axis);
        colorBar.Axis.TickGenerator = new DecadeTickGenerator();
        x.Style(plot.Axes.Bottom);
        y.Style(plot.Axes.Left);
        plot.Axes.SetLimits(xCells.Low, xCells.High, yCells.Low, yCells.High);
        plot.Grid.IsVisible = false;
        Save(plot, path, options);
    }

    /// <summary>
    /// The spectrum: |lambda| of each mode, sorted ascending, against the mode number, with a
    /// horizontal line for each explicit step limit (the largest |lambda| that step tolerates).
    /// Modes above the lowest line are drawn red. Modes with |lambda| &lt;= <paramref name="zeroTolerance"/>
    /// are zero modes: on a log axis they have no place and are counted in the legend instead.
    /// </summary>
    public static void Spectrum(string path, PlotText text, IReadOnlyList<double> magnitudes, IReadOnlyList<RateLimitLine> limits,
        double zeroTolerance = 0, PlotOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(magnitudes);
        ArgumentNullException.ThrowIfNull(limits);
        options ??= PlotOptions.Default;
        using var plot = Create(text, options);
        var shown = magnitudes.Select(Math.Abs).Where(double.IsFinite).Order().Select(m => m <= zeroTolerance ? 0.0 : m).ToArray();
        var modes = Enumerable.Range(1, shown.Length).Select(k => (double)k).ToArray();
        var x = PlotAxis.ForGrid(options.XScale, modes);
        var y = PlotAxis.ForMagnitudes(options.YScale, shown.Concat(limits.Select(l => l.Magnitude)));
        var threshold = limits.Count == 0 ? double.PositiveInfinity : limits.Min(l => l.Magnitude);
        var legend = new List<LegendItem>();
        var drawn = new List<Coordinates>();
        AddModes(plot, x, y, modes, shown, m => m <= threshold, SeriesPalette.GetColor(0), limits.Count == 0 ? "modes" : "within every limit", legend, drawn);
        AddModes(plot, x, y, modes, shown, m => m > threshold, SeriesPalette.GetColor(3), "beyond the lowest limit", legend, drawn);
        for (var k = 0; k < limits.Count; k++)
        {
            if (y.Map(limits[k].Magnitude) is not { } level)
            {
                continue;
            }
            var color = SeriesPalette.GetColor(k + 1);
            var pattern = Patterns[(k + 1) % Patterns.Length];
            plot.Add.HorizontalLine(level, LineWidth, color, pattern).ExcludeFromLegend = true;
            AddLinePoints(drawn, [x.Map(1) ?? 1, x.Map(Math.Max(1, modes.Length)) ?? 1], [level, level]);
            legend.Add(new LegendItem { LabelText = limits[k].Label, LineColor = color, LineWidth = LineWidth, LinePattern = pattern });
        }
        var zeroModes = shown.Count(m => m == 0);
        if (zeroModes > 0 && y.IsLog)
        {
            legend.Add(new LegendItem { LabelText = $"{zeroModes} zero mode{(zeroModes == 1 ? "" : "s")} not shown", LineWidth = 0 });
        }
        FinishAxes(plot, x, y, drawn, options.MaxDecades);
        PlaceLegend(plot, legend, drawn, options);
        Save(plot, path, options);
    }

    /// <summary>
    /// Distributions over the states against the state coordinate (e.g. initial, final and steady
    /// state), each curve with its own colour, line pattern and marker shape so that they stay
    /// distinct in black and white. Log-log when both the coordinates and the values call for it.
    /// </summary>
    public static void Distributions(string path, PlotText text, double[] coordinates, IReadOnlyList<Curve> curves, PlotOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(coordinates);
        ArgumentNullException.ThrowIfNull(curves);
        foreach (var curve in curves)
        {
            RequireLength(curve.Values, coordinates.Length, $"values of '{curve.Label}'");
        }
        options ??= PlotOptions.Default;
        using var plot = Create(text, options);
        var x = PlotAxis.ForGrid(options.XScale, coordinates);
        var y = PlotAxis.ForMagnitudes(options.YScale, curves.SelectMany(c => c.Values));
        var legend = new List<LegendItem>();
        var drawn = new List<Coordinates>();
        for (var k = 0; k < curves.Count; k++)
        {
            var color = SeriesPalette.GetColor(k % SeriesPalette.Colors.Length);
            var pattern = Patterns[k % Patterns.Length];
            var (px, py) = PlotAxis.MapPoints(x, y, coordinates, curves[k].Values);
            var scatter = plot.Add.Scatter(px, py, color);
            scatter.LineWidth = LineWidth;
            scatter.LinePattern = pattern;
            // Markers only while they stay apart; on a dense grid they would merge into a band.
            var shape = px.Length <= 80 ? _shapes[k % _shapes.Length] : MarkerShape.None;
            scatter.MarkerShape = shape;
            scatter.MarkerSize = 7;
            AddLinePoints(drawn, px, py);
            legend.Add(new LegendItem
            {
                LabelText = curves[k].Label,
                LineColor = color,
                LineWidth = LineWidth,
                LinePattern = pattern,
                MarkerShape = shape,
                MarkerSize = 7,
                MarkerFillColor = color,
                MarkerLineColor = color,
            });
        }
        FinishAxes(plot, x, y, drawn, options.MaxDecades);
        PlaceLegend(plot, legend, drawn, options);
        Save(plot, path, options);
    }

    private static void AddModes(Plot plot, PlotAxis x, PlotAxis y, double[] modes, double[] magnitudes, Func<double, bool> include,
        Color color, string label, List<LegendItem> legend, List<Coordinates> drawn)
    {
        var chosen = Enumerable.Range(0, magnitudes.Length).Where(k => include(magnitudes[k])).ToArray();
        var (px, py) = PlotAxis.MapPoints(x, y, chosen.Select(k => modes[k]).ToArray(), chosen.Select(k => magnitudes[k]).ToArray());
        if (px.Length == 0)
        {
            return;
        }
        var size = magnitudes.Length <= 200 ? MarkerSize : 5;
        plot.Add.Markers(px, py, MarkerShape.FilledCircle, size, color);
        drawn.AddRange(px.Select((v, i) => new Coordinates(v, py[i])));
        legend.Add(new LegendItem
        {
            LabelText = $"|λ| {label} ({px.Length})",
            LineWidth = 0,
            MarkerShape = MarkerShape.FilledCircle,
            MarkerSize = size,
            MarkerFillColor = color,
            MarkerLineColor = color,
        });
    }

    private static int[] DrawableIndices(PlotAxis axis, double[] values) =>
        Enumerable.Range(0, values.Length).Where(k => axis.Map(values[k]) is not null).ToArray();

    private static void RequireLength<T>(T[] values, int expected, string what)
    {
        ArgumentNullException.ThrowIfNull(values);
        if (values.Length != expected)
        {
            throw new ArgumentException($"Expected {expected} {what}, got {values.Length}.");
        }
    }
}
