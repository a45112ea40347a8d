using System.Numerics;
using RateDeck.Diagnostics;
using ScottPlot;
using static RateDeck.Outputs.PlotCanvas;
using static RateDeck.Text.Format;

namespace RateDeck.Outputs;

/// <summary>
/// PNG plots of results, made to be read on paper: large text, axis labels with units, and
/// logarithmic axes where the data span decades. The functions take plain arrays and labels, not
/// solver objects, and write through <see cref="AtomicFile"/>. Each plot is first built as a model
/// (what is drawn, what the legend says, the axis scales) that tests read instead of pixels.
/// <para>
/// Automatic scaling (<see cref="AxisScale.Auto"/>): a grid axis (time, state coordinate) is
/// logarithmic when its positive values span two decades or more and half of them lie below a
/// tenth of the largest, as on a geometric grid; a value axis (population, |lambda dt|) is
/// logarithmic when its positive values span three decades or more. Either stays linear when a
/// value is clearly negative (beyond 1e-12 of the largest magnitude, i.e. more than rounding), so an
/// unstable explicit run is shown as it is. A log axis drops zeros (t = 0, an empty state) and
/// reaches at most <see cref="PlotOptions.MaxDecades"/> below its largest value.
/// </para>
/// <para>
/// Resolution (<see cref="PlotOptions.Floor"/>): on a logarithmic population axis, values below the
/// floor are not drawn (the curve has a gap there), a dashed grey line marks the floor and the
/// legend says why. A curve with no value above the floor is not drawn and is named in a legend
/// note instead of having an entry of its own.
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

    private static readonly Color _floorColor = Colors.Gray;

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
        options ??= PlotOptions.Default;
        PopulationsModel(text, times, series, options, exactName, explicitName).Render(path, options);
    }

    /// <summary>The model of <see cref="PopulationsOverTime"/>.</summary>
    internal static PlotModel PopulationsModel(PlotText text, double[] times, IReadOnlyList<StateSeries> series,
        PlotOptions options, string exactName = "exact", string explicitName = "explicit")
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

        var floor = FloorValue(options);
        var x = PlotAxis.ForGrid(options.XScale, times);
        var y = ValueAxis(options.YScale, series.SelectMany(s => s.Exact.Concat(s.Explicit ?? [])), floor);
        var layers = new List<PlotLayer>();
        var legend = new List<LegendEntry>();
        var zero = new List<string>();
        for (var k = 0; k < series.Count; k++)
        {
            var (color, pattern) = Style(k);
            var values = series[k].Exact.Concat(series[k].Explicit ?? []);
            if (IsZero(values, floor))
            {
                zero.Add(series[k].Label);
                continue;
            }

            layers.Add(new PlotLayer(series[k].Label, Segments(x, y, floor, times, series[k].Exact), color, pattern, MarkerShape.None));
            if (series[k].Explicit is { } explicitValues)
            {
                var points = Segments(x, y, floor, times, explicitValues).SelectMany(s => s.X.Zip(s.Y)).ToArray();
                var stride = Math.Max(1, (int)Math.Ceiling(points.Length / (double)_maxMarkersPerSeries));
                var thinned = points.Where((_, i) => i % stride == 0).ToArray();
                layers.Add(new PlotLayer($"{series[k].Label} ({explicitName})", [new PlotSegment([.. thinned.Select(p => p.First)], [.. thinned.Select(p => p.Second)])],
                    color, null, MarkerShape.OpenCircle));
            }

            legend.Add(new LegendEntry(series[k].Label, color, pattern, MarkerShape.None));
        }

        if (series.Any(s => s.Explicit is not null) && layers.Count > 0)
        {
            legend.Add(new LegendEntry($"line: {exactName}", Colors.Black, LinePattern.Solid, MarkerShape.None));
            legend.Add(new LegendEntry($"marker: {explicitName}", Colors.Black, null, MarkerShape.OpenCircle));
        }

        var drawnValues = series.Where(s => !zero.Contains(s.Label)).SelectMany(s => s.Explicit is null ? [s.Exact] : new[] { s.Exact, s.Explicit });
        return Finish(new PlotModel(text, x, y, layers, legend), times, drawnValues, zero, floor);
    }

    /// <summary>
    /// A state-by-time map: colour is the population on a logarithmic scale (the colour bar's ticks
    /// are populations, 10ⁿ), time runs along the horizontal axis, the state (by
    /// <paramref name="stateAxis"/>: coordinates, or indices 0..N-1) along the vertical one.
    /// <c>populations[k][i]</c> is state i at <c>times[k]</c>; both axes must be strictly ascending.
    /// Each sample's cell reaches halfway to its neighbours, and the axes end at the outer cells'
    /// edges. Populations below <see cref="PlotOptions.Floor"/> (or zero and negative ones, which a
    /// log scale cannot colour) are grey, and the colour bar's label says so. The colour scale spans
    /// at most <see cref="PlotOptions.MaxDecades"/>; lower values take the lowest colour.
    /// </summary>
    public static void PopulationMap(string path, PlotText text, double[] times, double[] stateAxis, double[][] populations, PlotOptions? options = null)
    {
        options ??= PlotOptions.Default;
        var map = PopulationMapModel.Build(text, times, stateAxis, populations, options);
        using var plot = Create(text, options);
        var heatmap = plot.Add.Heatmap(map.Intensities);
        heatmap.Extent = new CoordinateRect(map.Columns.Low, map.Columns.High, map.Rows.Low, map.Rows.High);
        heatmap.Colormap = new ScottPlot.Colormaps.Viridis();
        heatmap.NaNCellColor = Colors.LightGray;
        heatmap.ManualRange = new ScottPlot.Range(map.ColourLow, map.ColourHigh);
        var colorBar = plot.Add.ColorBar(heatmap);
        colorBar.Label = map.ColourLabel;
        StyleLabel(colorBar.LabelStyle);
        StyleTicks(colorBar.Axis);
        colorBar.Axis.TickGenerator = new DecadeTickGenerator();
        map.X.Style(plot.Axes.Bottom);
        map.Y.Style(plot.Axes.Left);
        plot.Axes.SetLimits(map.Columns.Low, map.Columns.High, map.Rows.Low, map.Rows.High);
        plot.Grid.IsVisible = false;
        Save(plot, path, options);
    }

    /// <summary>
    /// The spectrum against the explicit methods' stability at step <paramref name="dt"/>: for each
    /// mode (sorted by |lambda|) the point |lambda dt|, on a logarithmic axis unless
    /// <see cref="PlotOptions.YScale"/> says linear (or every mode is zero), beside the ends of the stability intervals
    /// on the negative real axis, lambda dt in [-2, 0] for forward Euler and in
    /// [-<see cref="StepLimits.Rk4RealAxisLimit"/>, 0] for classical RK4, drawn as horizontal
    /// lines. A mode is stable for a method when |R(lambda dt)| &lt;= 1 with R its amplification
    /// factor (1 + z for Euler, the degree-4 Taylor polynomial of e^z for RK4), which on the real
    /// axis is exactly the interval; the markers say which methods each mode is stable for.
    /// Modes with |lambda| &lt;= <paramref name="zeroTolerance"/> are zero modes (stable for both);
    /// a log axis has no place for them and the legend counts them.
    /// </summary>
    public static void Spectrum(string path, PlotText text, IReadOnlyList<Complex> eigenvalues, double dt, double zeroTolerance = 0, PlotOptions? options = null)
    {
        options ??= PlotOptions.Default;
        SpectrumModel(text, eigenvalues, dt, zeroTolerance, options).Render(path, options);
    }

    /// <summary>
    /// The model of <see cref="Spectrum"/>. A partial spectrum gives <paramref name="places"/>, each
    /// eigenvalue's place from 1 among all N sorted by |lambda|, and <paramref name="partial"/>, a
    /// legend line saying which modes are drawn; otherwise the modes are numbered as they sort.
    /// </summary>
    internal static PlotModel SpectrumModel(PlotText text, IReadOnlyList<Complex> eigenvalues, double dt, double zeroTolerance, PlotOptions options,
        IReadOnlyList<int>? places = null, string? partial = null)
    {
        ArgumentNullException.ThrowIfNull(eigenvalues);
        if (!(dt > 0) || !double.IsFinite(dt))
        {
            throw new ArgumentOutOfRangeException(nameof(dt), dt, "The step must be positive and finite.");
        }

        var drawn = Enumerable.Range(0, eigenvalues.Count).Where(k => double.IsFinite(eigenvalues[k].Real) && double.IsFinite(eigenvalues[k].Imaginary))
            .Select(k => (Place: places?[k], Z: Complex.Abs(eigenvalues[k]) <= zeroTolerance ? Complex.Zero : eigenvalues[k] * dt))
            .OrderBy(m => Complex.Abs(m.Z)).ToArray();
        var z = drawn.Select(m => m.Z).ToArray();
        var modes = drawn.Select((m, k) => (double)(m.Place ?? (k + 1))).ToArray();
        var size = z.Length <= 200 ? MarkerSize : 5;
        var heights = z.Select(Complex.Abs).ToArray();
        var x = PlotAxis.ForGrid(options.XScale, modes);
        // Logarithmic unless asked otherwise: what matters is each mode's ratio to the interval's end,
        // and a linear axis would squash the slow modes onto zero.
        var y = PlotAxis.ForMagnitudes(options.YScale == AxisScale.Auto && heights.Any(h => h > 0) ? AxisScale.Log : options.YScale,
            heights.Concat([2.0, StepLimits.Rk4RealAxisLimit]));
        var layers = new List<PlotLayer>();
        var legend = new List<LegendEntry>();
        var groups = new (string Label, Func<Complex, bool> Include, Color Color, MarkerShape Shape)[]
        {
            ("stable for Euler and RK4", v => EulerStable(v) && Rk4Stable(v), SeriesPalette.GetColor(0), MarkerShape.FilledCircle),
            ("stable for RK4 only", v => !EulerStable(v) && Rk4Stable(v), SeriesPalette.GetColor(1), MarkerShape.FilledSquare),
            ("stable for Euler only", v => EulerStable(v) && !Rk4Stable(v), SeriesPalette.GetColor(4), MarkerShape.FilledDiamond),
            ("unstable for both", v => !EulerStable(v) && !Rk4Stable(v), SeriesPalette.GetColor(3), MarkerShape.FilledTriangleUp),
        };
        foreach (var (label, include, color, shape) in groups)
        {
            var chosen = Enumerable.Range(0, z.Length).Where(k => include(z[k]) && y.Map(heights[k]) is not null).ToArray();
            if (chosen.Length == 0)
            {
                continue;
            }

            layers.Add(new PlotLayer(label, [new PlotSegment([.. chosen.Select(k => modes[k])], [.. chosen.Select(k => heights[k])])], color, null, shape, size));
            legend.Add(new LegendEntry($"{label} ({chosen.Length})", color, null, shape, size));
        }

        var ends = new[] { 0.5, modes.DefaultIfEmpty(1).Max() + 0.5 };
        var intervals = new (string Label, double Bound, Color Color, LinePattern Pattern)[]
        {
            ("Euler: λ·dt in [-2, 0]", 2.0, Colors.Black, LinePattern.Dashed),
            ($"RK4: λ·dt in [-{Number(StepLimits.Rk4RealAxisLimit)}, 0]", StepLimits.Rk4RealAxisLimit, Colors.Black, LinePattern.Dotted),
        };
        foreach (var (label, bound, color, pattern) in intervals)
        {
            layers.Add(new PlotLayer(label, [new PlotSegment(ends, [bound, bound])], color, pattern, MarkerShape.None));
            legend.Add(new LegendEntry(label, color, pattern, MarkerShape.None));
        }

        var zeroModes = z.Count(v => v == Complex.Zero);
        if (zeroModes > 0 && y.IsLog)
        {
            legend.Add(LegendEntry.Note($"{Count(zeroModes, "zero mode", "zero modes")} (λ = 0, stable) not drawn"));
        }

        if (partial is not null)
        {
            legend.Add(LegendEntry.Note(partial));
        }

        if (z.Any(v => Math.Abs(v.Imaginary) > zeroTolerance * dt))
        {
            legend.Add(LegendEntry.Note("complex λ: drawn at |λ·dt|, judged by |R(λ·dt)| ≤ 1"));
        }

        return new PlotModel(text, x, y, layers, legend) { IntegerX = !x.IsLog };
    }

    /// <summary>
    /// Distributions over the states against the state coordinate (e.g. initial, final and steady
    /// state), each curve with its own colour, line pattern and marker shape so that they stay
    /// distinct in black and white. Log-log when both the coordinates and the values call for it.
    /// </summary>
    public static void Distributions(string path, PlotText text, double[] coordinates, IReadOnlyList<Curve> curves, PlotOptions? options = null)
    {
        options ??= PlotOptions.Default;
        DistributionsModel(text, coordinates, curves, options).Render(path, options);
    }

    /// <summary>The model of <see cref="Distributions"/>.</summary>
    internal static PlotModel DistributionsModel(PlotText text, double[] coordinates, IReadOnlyList<Curve> curves, PlotOptions options)
    {
        ArgumentNullException.ThrowIfNull(coordinates);
        ArgumentNullException.ThrowIfNull(curves);
        foreach (var curve in curves)
        {
            RequireLength(curve.Values, coordinates.Length, $"values of '{curve.Label}'");
        }

        var floor = FloorValue(options);
        var x = PlotAxis.ForGrid(options.XScale, coordinates);
        var y = ValueAxis(options.YScale, curves.SelectMany(c => c.Values), floor);
        var layers = new List<PlotLayer>();
        var legend = new List<LegendEntry>();
        var zero = new List<string>();
        for (var k = 0; k < curves.Count; k++)
        {
            if (IsZero(curves[k].Values, floor))
            {
                zero.Add(curves[k].Label);
                continue;
            }

            var color = SeriesPalette.GetColor(k % SeriesPalette.Colors.Length);
            var pattern = Patterns[k % Patterns.Length];
            // Markers only while they stay apart; on a dense grid they would merge into a band.
            var shape = coordinates.Length <= 80 ? _shapes[k % _shapes.Length] : MarkerShape.None;
            layers.Add(new PlotLayer(curves[k].Label, Segments(x, y, floor, coordinates, curves[k].Values), color, pattern, shape, 7));
            legend.Add(new LegendEntry(curves[k].Label, color, pattern, shape, 7));
        }

        return Finish(new PlotModel(text, x, y, layers, legend), coordinates, curves.Where(c => !zero.Contains(c.Label)).Select(c => c.Values), zero, floor);
    }

    /// <summary>
    /// The Boltzmann plot of a distribution: ln(n_i / g_i) against the energy E_i, one marker per
    /// state above <see cref="PlotOptions.Floor"/>, and the equilibrium at the deck's kT as a
    /// reference line of slope -1/kT holding the same total population. A distribution at
    /// equilibrium lies on the line.
    /// </summary>
    public static void Boltzmann(string path, PlotText text, BoltzmannPoints points, PlotOptions? options = null)
    {
        options ??= PlotOptions.Default;
        BoltzmannModel(text, points, options).Render(path, options);
    }

    /// <summary>The model of <see cref="Boltzmann"/>.</summary>
    internal static PlotModel BoltzmannModel(PlotText text, BoltzmannPoints points, PlotOptions options)
    {
        ArgumentNullException.ThrowIfNull(points);
        var n = points.Energies.Length;
        RequireLength(points.LogWeights, n, "ln g values");
        RequireLength(points.Populations, n, "populations");
        RequireLength(points.LogEquilibrium, n, "ln pi values");
        var floor = FloorValue(options);
        var shown = Enumerable.Range(0, n).Where(i => points.Populations[i] > floor && double.IsFinite(points.Populations[i])).ToArray();
        // Linear in E unless asked otherwise: only there is the equilibrium a straight line.
        var x = options.XScale == AxisScale.Auto ? PlotAxis.Linear : PlotAxis.ForGrid(options.XScale, points.Energies);
        var y = PlotAxis.Linear;
        var layers = new List<PlotLayer>();
        var legend = new List<LegendEntry>();
        var color = SeriesPalette.GetColor(0);
        if (shown.Length > 0)
        {
            layers.Add(new PlotLayer(points.Label,
                [new PlotSegment([.. shown.Select(i => points.Energies[i])], [.. shown.Select(i => Math.Log(points.Populations[i]) - points.LogWeights[i])])],
                color, null, MarkerShape.FilledCircle));
            legend.Add(new LegendEntry(points.Label, color, null, MarkerShape.FilledCircle));
        }

        // n_eq,i / g_i = total pi_i / g_i: ln of it is ln total + ln pi_i - ln g_i = c - E_i / kT, a line;
        // its intercept is taken at the lowest state, where pi is largest and best resolved.
        var total = points.Populations.Where(double.IsFinite).Sum();
        if (total > 0 && n > 0 && points.KT > 0)
        {
            var lowest = Enumerable.Range(0, n).MinBy(i => points.Energies[i]);
            var intercept = Math.Log(total) + points.LogEquilibrium[lowest] - points.LogWeights[lowest] + (points.Energies[lowest] / points.KT);
            var ends = new[] { points.Energies.Min(), points.Energies.Max() };
            var label = $"equilibrium at kT = {Number(points.KT)}{UnitSuffix(points.EnergyUnit)}: slope -1/kT = {Number(-1 / points.KT)}{PerUnit(points.EnergyUnit)}";
            layers.Add(new PlotLayer("equilibrium", [new PlotSegment(ends, [.. ends.Select(e => intercept - (e / points.KT))])], Colors.Black, LinePattern.Dashed, MarkerShape.None));
            legend.Add(new LegendEntry(label, Colors.Black, LinePattern.Dashed, MarkerShape.None));
        }

        if (shown.Length < n)
        {
            legend.Add(LegendEntry.Note($"{Count(n - shown.Length, "state", "states")} at or below {Number(floor)} not drawn"));
        }

        return new PlotModel(text, x, y, layers, legend);
    }

    private static string UnitSuffix(string? unit) => string.IsNullOrEmpty(unit) ? "" : $" {unit}";

    private static string PerUnit(string? unit) => string.IsNullOrEmpty(unit) ? "" : $" per {unit}";

    /// <summary>Forward Euler's amplification |1 + z| &lt;= 1 (common practice).</summary>
    internal static bool EulerStable(Complex z) => Complex.Abs(1 + z) <= 1 + 1e-12;

    /// <summary>Classical RK4's amplification |1 + z + z²/2 + z³/6 + z⁴/24| &lt;= 1 (Hairer and Wanner, vol. I, sec. II.2 on stability, from memory).</summary>
    internal static bool Rk4Stable(Complex z) => Complex.Abs(1 + (z * (1 + (z * (0.5 + (z * ((1.0 / 6) + (z / 24)))))))) <= 1 + 1e-12;

    private static double FloorValue(PlotOptions options) => options.Floor?.Value ?? 0;

    /// <summary>A value axis decided by the values above the floor (those below count as zero).</summary>
    private static PlotAxis ValueAxis(AxisScale requested, IEnumerable<double> values, double floor) =>
        PlotAxis.ForMagnitudes(requested, values.Select(v => Math.Abs(v) <= floor ? 0 : v));

    /// <summary>No value of the curve above the floor in magnitude (or, without a floor, every value zero).</summary>
    private static bool IsZero(IEnumerable<double> values, double floor) => values.All(v => Math.Abs(v) <= floor || double.IsNaN(v));

    /// <summary>The drawable points of a curve, split where a point cannot be drawn or lies below the floor on a log axis.</summary>
    private static PlotSegment[] Segments(PlotAxis x, PlotAxis y, double floor, IReadOnlyList<double> xs, IReadOnlyList<double> ys)
    {
        var segments = new List<PlotSegment>();
        var (sx, sy) = (new List<double>(), new List<double>());
        void Close()
        {
            if (sx.Count > 0)
            {
                segments.Add(new PlotSegment([.. sx], [.. sy]));
                (sx, sy) = (new List<double>(), new List<double>());
            }
        }

        for (var k = 0; k < xs.Count; k++)
        {
            var visible = x.Map(xs[k]) is not null && y.Map(ys[k]) is not null && (!y.IsLog || ys[k] >= floor);
            if (!visible)
            {
                Close();
                continue;
            }

            sx.Add(xs[k]);
            sy.Add(ys[k]);
        }

        Close();
        return [.. segments];
    }

    /// <summary>Adds the floor line and the notes on what is not drawn.</summary>
    /// <param name="model">The curves drawn.</param>
    /// <param name="xs">The horizontal positions of the data.</param>
    /// <param name="curves">The values of the curves drawn, one array per curve over <paramref name="xs"/>.</param>
    /// <param name="zero">The labels of the curves not drawn for being zero throughout.</param>
    /// <param name="floor">The floor.</param>
    private static PlotModel Finish(PlotModel model, double[] xs, IEnumerable<double[]> curves, List<string> zero, double floor)
    {
        var layers = model.Layers.ToList();
        var legend = model.Legend.ToList();
        double? shownFloor = null;
        // The floor line shows where curves were cut; where none was, it would only stretch the axis.
        var cut = model.Y.IsLog && floor > 0 && curves.Any(values => values.Where((v, k) => model.X.Map(xs[k]) is not null).Any(v => v < floor));
        if (cut)
        {
            var ends = xs.Where(v => model.X.Map(v) is not null).ToArray();
            if (ends.Length > 0)
            {
                layers.Add(new PlotLayer("floor", [new PlotSegment([ends.Min(), ends.Max()], [floor, floor])], _floorColor, LinePattern.Dashed, MarkerShape.None) { KeepUncovered = false });
                legend.Add(new LegendEntry($"not resolved below {Number(floor)}", _floorColor, LinePattern.Dashed, MarkerShape.None));
                shownFloor = floor;
            }
        }

        if (zero.Count > 0)
        {
            var what = floor > 0 ? $"at or below {Number(floor)} throughout" : "zero throughout";
            legend.Add(LegendEntry.Note($"{what}, not drawn: {string.Join(", ", zero)}"));
        }

        return model with { Layers = layers, Legend = legend, Floor = shownFloor };
    }

    private static void RequireLength<T>(T[] values, int expected, string what)
    {
        ArgumentNullException.ThrowIfNull(values);
        if (values.Length != expected)
        {
            throw new ArgumentException($"Expected {expected} {what}, got {values.Length}.");
        }
    }
}
