using System.Globalization;
using ScottPlot;

namespace RateDeck.Outputs;

/// <summary>
/// The shared look of every plot: a canvas laid out about 800 x 500 logical pixels and scaled to
/// the requested size (so text, lines and markers keep their proportions), large text,
/// faint grids, decade ticks on log axes, a legend that avoids the data, and PNG output through
/// <see cref="AtomicFile"/>.
/// </summary>
internal static class PlotCanvas
{
    public const float LineWidth = 2.5f;
    public const float MarkerSize = 9;

    private const float _layoutWidth = 800;
    private const float _layoutHeight = 500;
    private const float _minScale = 0.75f;
    private const float _titleSize = 19;
    private const float _axisLabelSize = 17;
    private const float _tickLabelSize = 14;
    private const float _legendSize = 14;
    private const string _preferredFont = "DejaVu Sans";

    // About this many characters of DejaVu Sans at the title size fit across the 800-pixel layout.
    private const int _titleCharactersPerLine = 62;

    public static readonly IPalette SeriesPalette = new ScottPlot.Palettes.Category10();
    public static readonly LinePattern[] Patterns = [LinePattern.Solid, LinePattern.Dashed, LinePattern.Dotted, LinePattern.DenselyDashed];

    /// <summary>DejaVu Sans when installed, else the first family found, null when there is none.</summary>
    public static string? FontFamily { get; } = FindFont();

    /// <summary>Colour and line pattern of series <paramref name="index"/>: ten colours, then the next pattern.</summary>
    public static (Color Color, LinePattern Pattern) Style(int index) =>
        (SeriesPalette.GetColor(index % SeriesPalette.Colors.Length), Patterns[index / SeriesPalette.Colors.Length % Patterns.Length]);

    public static Plot Create(PlotText text, PlotOptions options)
    {
        ArgumentNullException.ThrowIfNull(text);
        if (options.Width < 200 || options.Height < 150)
        {
            throw new ArgumentException($"A plot needs at least 200 x 150 pixels, not {options.Width} x {options.Height}.", nameof(options));
        }
        // Small images keep text at three quarters of the layout size at least, or it gets unreadable.
        var scale = Math.Max(_minScale, Math.Min(options.Width / _layoutWidth, options.Height / _layoutHeight));
        var plot = new Plot { ScaleFactor = scale };
        if (FontFamily is not null)
        {
            plot.Font.Set(FontFamily);
        }
        plot.Axes.Title.Label.Text = WrapTitle(text.Title);
        plot.Axes.Title.Label.FontSize = _titleSize;
        foreach (var (axis, label) in new[] { ((IAxis)plot.Axes.Bottom, text.XLabel), (plot.Axes.Left, text.YLabel) })
        {
            axis.Label.Text = label;
            axis.Label.FontSize = _axisLabelSize;
            axis.Label.Bold = false;
            StyleTicks(axis);
        }
        plot.Grid.MajorLineColor = Colors.Black.WithAlpha(0.15);
        plot.Grid.MinorLineColor = Colors.Black.WithAlpha(0.06);
        plot.Grid.MinorLineWidth = 1;
        return plot;
    }

    /// <summary>
    /// The title in lines of at most <paramref name="charactersPerLine"/> characters where it can be
    /// broken: after its last ": " (the deck's title, then what the plot shows) when both parts fit,
    /// otherwise at the spaces, as few lines as the words allow.
    /// </summary>
    public static string WrapTitle(string title, int charactersPerLine = _titleCharactersPerLine)
    {
        if (title.Length <= charactersPerLine || title.Contains('\n', StringComparison.Ordinal))
        {
            return title;
        }

        // Break after the deck's title only where both parts then fit on a line; else fill the lines.
        var colon = title.LastIndexOf(": ", StringComparison.Ordinal);
        var parts = colon > 0 && colon + 1 <= charactersPerLine && title.Length - colon - 2 <= charactersPerLine
            ? new[] { title[..(colon + 1)], title[(colon + 2)..] }
            : [title];
        var lines = new List<string>();
        foreach (var part in parts)
        {
            var line = "";
            foreach (var word in part.Split(' '))
            {
                if (line.Length > 0 && line.Length + 1 + word.Length > charactersPerLine)
                {
                    lines.Add(line);
                    line = word;
                }
                else
                {
                    line = line.Length == 0 ? word : $"{line} {word}";
                }
            }

            lines.Add(line);
        }

        return string.Join('\n', lines);
    }

    /// <summary>
    /// Tick marks and tick labels at the common size; linear tick labels as plain invariant
    /// numbers (1000, not 1,000).
    /// </summary>
    public static void StyleTicks(IAxis axis)
    {
        if (axis.TickGenerator is ScottPlot.TickGenerators.NumericAutomatic numeric)
        {
            numeric.LabelFormatter = value => value.ToString("G6", CultureInfo.InvariantCulture);
        }
        axis.TickLabelStyle.FontSize = _tickLabelSize;
        axis.MajorTickStyle.Length = 7;
        axis.MajorTickStyle.Width = 1.5f;
        axis.MinorTickStyle.Length = 4;
        axis.MinorTickStyle.Width = 1;
    }

    /// <summary>A label at the axis-label size (for the colour bar).</summary>
    public static void StyleLabel(LabelStyle label)
    {
        label.FontSize = _axisLabelSize;
        if (FontFamily is not null)
        {
            label.FontName = FontFamily;
        }
    }

    /// <summary>
    /// The points of a polyline, with intermediate points, so that the legend placement sees the
    /// segments and not only their ends.
    /// </summary>
    public static void AddLinePoints(List<Coordinates> drawn, double[] xs, double[] ys)
    {
        const int pieces = 8;
        for (var k = 0; k < xs.Length; k++)
        {
            drawn.Add(new Coordinates(xs[k], ys[k]));
            for (var j = 1; j < pieces && k + 1 < xs.Length; j++)
            {
                var f = j / (double)pieces;
                drawn.Add(new Coordinates(xs[k] + f * (xs[k + 1] - xs[k]), ys[k] + f * (ys[k + 1] - ys[k])));
            }
        }
    }

    /// <summary>
    /// Log ticks where needed, limits fitted to the data, and on a log value axis no more than
    /// <paramref name="maxDecades"/> below the largest drawn value.
    /// </summary>
    public static void FinishAxes(Plot plot, PlotAxis x, PlotAxis y, List<Coordinates> drawn, double maxDecades)
    {
        x.Style(plot.Axes.Bottom);
        y.Style(plot.Axes.Left);
        plot.Axes.AutoScale();
        if (y.IsLog && drawn.Count > 0)
        {
            var high = drawn.Max(c => c.Y);
            var low = Math.Max(drawn.Min(c => c.Y), high - maxDecades);
            var pad = Math.Max(0.04 * (high - low), 0.1);
            plot.Axes.SetLimitsY(low - pad, high + pad);
        }
    }

    /// <summary>
    /// Puts the legend inside the data area, in the first corner (upper right, upper left, lower
    /// right, lower left) that covers no drawn point, or outside when every corner would hide data:
    /// on the right, or below when it is wider than a third of the image. One trial render tells the
    /// legend's size and where the data area is.
    /// </summary>
    public static void PlaceLegend(Plot plot, List<LegendItem> items, List<Coordinates> drawn, PlotOptions options)
    {
        if (items.Count == 0)
        {
            return;
        }
        plot.Legend.ManualItems.AddRange(items);
        plot.Legend.FontSize = _legendSize;
        if (FontFamily is not null)
        {
            plot.Legend.FontName = FontFamily;
        }
        plot.Legend.BackgroundColor = Colors.White.WithAlpha(0.9);
        plot.Legend.ShadowColor = Colors.Transparent;
        // Long enough to show a dash pattern.
        plot.Legend.SymbolWidth = 40;
        plot.ShowLegend(Alignment.UpperRight);
        plot.RenderInMemory(options.Width, options.Height);
        var dataArea = plot.LastRender.DataRect;
        var legendSize = plot.Legend.LastRenderSize;
        // GetPixel answers in image pixels; the layout rectangles are in logical pixels.
        var points = drawn.Select(c => plot.GetPixel(c)).Select(p => (X: p.X / (float)plot.ScaleFactor, Y: p.Y / (float)plot.ScaleFactor)).ToArray();
        foreach (var corner in new[] { Alignment.UpperRight, Alignment.UpperLeft, Alignment.LowerRight, Alignment.LowerLeft })
        {
            var box = new PixelRect(legendSize).AlignedInside(dataArea, corner, plot.Legend.Margin).Expand(4);
            if (!points.Any(p => box.Contains(p.X, p.Y)))
            {
                plot.Legend.Alignment = corner;
                return;
            }
        }
        // A legend wider than a third of the image would squeeze the data into a strip beside it:
        // such a legend goes below the data instead.
        if (legendSize.Width > _layoutWidth / 3)
        {
            plot.ShowLegend(Edge.Bottom);
            return;
        }

        plot.ShowLegend(Edge.Right);
        // The title is centred over the data area, which the legend beside it narrows.
        plot.RenderInMemory(options.Width, options.Height);
        var characters = (int)(_titleCharactersPerLine * plot.LastRender.DataRect.Width / _layoutWidth);
        plot.Axes.Title.Label.Text = WrapTitle(plot.Axes.Title.Label.Text.Replace('\n', ' '), Math.Max(characters, 20));
    }

    public static void Save(Plot plot, string path, PlotOptions options)
    {
        if (Plots.FontProblem(FontFamily) is { } problem)
        {
            throw new InvalidOperationException(problem);
        }

        var png = plot.GetImageBytes(options.Width, options.Height, ImageFormat.Png);
        AtomicFile.WriteBytes(path, stream => stream.Write(png));
    }

    private static string? FindFont()
    {
        var families = SkiaSharp.SKFontManager.Default.FontFamilies;
        return families.Contains(_preferredFont, StringComparer.Ordinal) ? _preferredFont : families.FirstOrDefault();
    }
}
