using ScottPlot;
using static RateDeck.Outputs.PlotCanvas;

namespace RateDeck.Outputs;

/// <summary>A run of consecutive drawable points of a layer, in data units (a gap ends one run and starts the next).</summary>
internal sealed record PlotSegment(double[] X, double[] Y);

/// <summary>
/// One drawn thing: a curve, a set of markers or a reference line, in data units.
/// <paramref name="Line"/> null draws markers only; <paramref name="Marker"/> None draws the line only.
/// </summary>
internal sealed record PlotLayer(string Name, IReadOnlyList<PlotSegment> Segments, Color Color, LinePattern? Line, MarkerShape Marker, float MarkerSize = MarkerSize)
{
    /// <summary>Whether the legend must leave this layer uncovered (false for a reference line along an edge).</summary>
    public bool KeepUncovered { get; init; } = true;

    /// <summary>Every drawn y value, for tests and axis limits.</summary>
    public IEnumerable<double> Ys => Segments.SelectMany(s => s.Y);
}

/// <summary>A legend line: its text and the symbol drawn beside it (no line and no marker: a note).</summary>
internal sealed record LegendEntry(string Label, Color Color, LinePattern? Line, MarkerShape Marker, float MarkerSize = MarkerSize)
{
    /// <summary>A legend line without a symbol.</summary>
    public static LegendEntry Note(string text) => new(text, Colors.Black, null, MarkerShape.None);
}

/// <summary>
/// What a line plot shows, decided before anything is drawn: its words, axis scales, layers,
/// legend, and the floor below which values are not drawn. Built by the functions of
/// <see cref="Plots"/> and drawn by <see cref="Render"/>; tests read it instead of pixels.
/// </summary>
internal sealed record PlotModel(PlotText Text, PlotAxis X, PlotAxis Y, IReadOnlyList<PlotLayer> Layers, IReadOnlyList<LegendEntry> Legend)
{
    /// <summary>The lowest value drawn on a logarithmic value axis (data units); null when there is none.</summary>
    public double? Floor { get; init; }

    /// <summary>Whole numbers only on the horizontal axis (mode numbers).</summary>
    public bool IntegerX { get; init; }

    /// <summary>The layer called <paramref name="name"/>, or null.</summary>
    public PlotLayer? Layer(string name) => Layers.FirstOrDefault(l => l.Name == name);

    /// <summary>Draws the model and writes it as a PNG through <see cref="AtomicFile"/>.</summary>
    public void Render(string path, PlotOptions options)
    {
        using var plot = Create(Text, options);
        var drawn = new List<Coordinates>();
        var limitsOnly = new List<Coordinates>();
        foreach (var layer in Layers)
        {
            foreach (var segment in layer.Segments)
            {
                var (px, py) = PlotAxis.MapPoints(X, Y, segment.X, segment.Y);
                if (px.Length == 0)
                {
                    continue;
                }

                // Points the legend may cover still set the axis limits, as FinishAxes reads them.
                var points = layer.KeepUncovered ? drawn : limitsOnly;

                if (layer.Line is { } pattern)
                {
                    var scatter = plot.Add.Scatter(px, py, layer.Color);
                    scatter.LineWidth = LineWidth;
                    scatter.LinePattern = pattern;
                    scatter.MarkerShape = layer.Marker;
                    scatter.MarkerSize = layer.MarkerSize;
                    AddLinePoints(points, px, py);
                }
                else
                {
                    var markers = plot.Add.Markers(px, py, layer.Marker, layer.MarkerSize, layer.Color);
                    markers.MarkerLineWidth = 2;
                    points.AddRange(px.Select((v, i) => new Coordinates(v, py[i])));
                }
            }
        }

        if (IntegerX)
        {
            plot.Axes.Bottom.TickGenerator = new ScottPlot.TickGenerators.NumericAutomatic { IntegerTicksOnly = true };
            StyleTicks(plot.Axes.Bottom);
        }

        FinishAxes(plot, X, Y, [.. drawn, .. limitsOnly], options.MaxDecades);
        PlaceLegend(plot, Legend.Select(ToItem).ToList(), drawn, options);
        Save(plot, path, options);
    }

    private static LegendItem ToItem(LegendEntry entry) => new()
    {
        LabelText = entry.Label,
        LineColor = entry.Color,
        LineWidth = entry.Line is null ? 0 : LineWidth,
        LinePattern = entry.Line ?? LinePattern.Solid,
        MarkerShape = entry.Marker,
        MarkerSize = entry.MarkerSize,
        MarkerFillColor = entry.Color,
        MarkerLineColor = entry.Color,
        MarkerLineWidth = 2,
    };
}
