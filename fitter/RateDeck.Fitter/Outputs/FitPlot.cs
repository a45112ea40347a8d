using RateDeck.Fitting.Model;
using RateDeck.Outputs;
using ScottPlot;
using SkiaSharp;

namespace RateDeck.Fitting.Outputs;

/// <summary>
/// fit.png: for each data set, a panel of the data (markers, with their standard deviations as
/// error bars when given) against the fitted curves (lines), and under it a panel of the weighted
/// residuals against time with the zero line. Panels are stacked in one image.
/// </summary>
public static class FitPlot
{
    private const int _width = 1600;
    private const int _fitHeight = 760;
    private const int _residualHeight = 420;
    private const int _curvePoints = 400;

    /// <summary>Writes the figure to <paramref name="path"/>.</summary>
    public static void Write(string path, FitOutcome outcome)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        var problem = outcome.Problem;
        var targets = problem.Parameters.Select(p => p.Target).ToList();
        var fitted = problem.Predict(outcome.Values);
        var panels = new List<byte[]>();
        var offset = 0;
        foreach (var set in problem.DataSets)
        {
            var deck = set.Apply(targets, outcome.Values);
            var end = set.Times[^1];
            var grid = Enumerable.Range(0, _curvePoints + 1).Select(k => end * k / _curvePoints).Concat(set.Times).Distinct().Order().ToArray();
            var curves = set.Curves(deck, grid);
            panels.Add(FitPanel(set, grid, curves, outcome.Deck.TimeUnit));
            panels.Add(ResidualPanel(set, fitted, problem.Weights, offset, problem.HasStandardDeviations, outcome.Deck.TimeUnit));
            offset += set.Data.Count;
        }

        var height = panels.Count / 2 * (_fitHeight + _residualHeight);
        using var surface = SKSurface.Create(new SKImageInfo(_width, height));
        surface.Canvas.Clear(SKColors.White);
        var top = 0;
        foreach (var (png, k) in panels.Select((p, k) => (p, k)))
        {
            using var bitmap = SKBitmap.Decode(png);
            surface.Canvas.DrawBitmap(bitmap, 0, top);
            top += k % 2 == 0 ? _fitHeight : _residualHeight;
        }

        using var image = surface.Snapshot();
        using var data = image.Encode(SKEncodedImageFormat.Png, 100);
        AtomicFile.WriteBytes(path, stream => data.SaveTo(stream));
    }

    private static byte[] FitPanel(DataSetModel set, double[] grid, double[][] curves, string timeUnit)
    {
        using var plot = NewPlot($"data set {set.Spec.Name}: data (markers) and fitted curves (lines)", $"time ({timeUnit})", "value");
        for (var s = 0; s < set.Data.Series.Count; s++)
        {
            var series = set.Data.Series[s];
            var (color, pattern) = PlotCanvas.Style(s);
            var line = plot.Add.ScatterLine(grid, curves[s], color);
            line.LineWidth = PlotCanvas.LineWidth;
            line.LinePattern = pattern;
            line.LegendText = series.Name;
            if (series.StandardDeviations is { } sd)
            {
                var bars = plot.Add.ErrorBar(series.Times, series.Values, sd);
                bars.LineColor = color;
            }

            var markers = plot.Add.Markers(series.Times, series.Values, MarkerShape.OpenCircle, PlotCanvas.MarkerSize, color);
            markers.MarkerLineWidth = 2;
        }

        plot.ShowLegend(Edge.Right);
        return plot.GetImageBytes(_width, _fitHeight, ImageFormat.Png);
    }

    private static byte[] ResidualPanel(DataSetModel set, double[] fitted, IReadOnlyList<double> weights, int offset, bool weighted, string timeUnit)
    {
        using var plot = NewPlot($"data set {set.Spec.Name}: residuals", $"time ({timeUnit})", weighted ? "(observed - fitted) / sd" : "observed - fitted");
        var k = offset;
        for (var s = 0; s < set.Data.Series.Count; s++)
        {
            var series = set.Data.Series[s];
            var residuals = series.Values.Select((v, row) => (v - fitted[k + row]) * weights[k + row]).ToArray();
            k += series.Values.Length;
            var (color, _) = PlotCanvas.Style(s);
            var markers = plot.Add.Markers(series.Times, residuals, MarkerShape.FilledCircle, PlotCanvas.MarkerSize * 0.8f, color);
            markers.LegendText = series.Name;
        }

        var zero = plot.Add.HorizontalLine(0, 1.5f, Colors.Black);
        zero.LinePattern = LinePattern.Dashed;
        plot.ShowLegend(Edge.Right);
        return plot.GetImageBytes(_width, _residualHeight, ImageFormat.Png);
    }

    private static Plot NewPlot(string title, string xLabel, string yLabel)
    {
        var plot = new Plot();
        if (PlotCanvas.FontFamily is { } font)
        {
            plot.Font.Set(font);
        }

        plot.Axes.Title.Label.Text = title;
        plot.Axes.Bottom.Label.Text = xLabel;
        plot.Axes.Left.Label.Text = yLabel;
        plot.Axes.Title.Label.FontSize = 22;
        plot.Axes.Bottom.Label.FontSize = 20;
        plot.Axes.Left.Label.FontSize = 20;
        PlotCanvas.StyleTicks(plot.Axes.Bottom);
        PlotCanvas.StyleTicks(plot.Axes.Left);
        return plot;
    }
}
