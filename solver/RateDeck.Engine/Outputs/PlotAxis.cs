using ScottPlot;

namespace RateDeck.Outputs;

/// <summary>
/// Maps data values to plot coordinates along one axis: identity on a linear axis, log10 on a
/// logarithmic one (where zero and negative values have no place and are dropped).
/// </summary>
internal sealed class PlotAxis
{
    // Below zero by less than this fraction of the largest magnitude is rounding noise (explicit
    // steps leave -1e-17 where the population is zero); it must not force a linear axis.
    private const double _roundingNoise = 1e-12;

    private PlotAxis(bool isLog) => IsLog = isLog;

    public bool IsLog { get; }

    /// <summary>A linear axis.</summary>
    public static PlotAxis Linear { get; } = new(false);

    /// <summary>
    /// The scale for a grid (times, state coordinates): logarithmic when all values are
    /// non-negative, the positive ones span at least two decades, and half of them lie below a tenth
    /// of the largest, i.e. the points are crowded toward small values as on a geometric grid.
    /// A linear grid from 0 keeps its median near the middle and stays linear.
    /// </summary>
    public static PlotAxis ForGrid(AxisScale requested, IReadOnlyList<double> values) =>
        Resolve(requested, values, positive =>
        {
            if (positive.Length < 3)
            {
                return false;
            }
            Array.Sort(positive);
            var max = positive[^1];
            return max / positive[0] >= 1e2 && positive[positive.Length / 2] <= max / 10;
        });

    /// <summary>
    /// The scale for magnitudes (populations, rates): logarithmic when all values are non-negative
    /// and the positive ones span at least three decades.
    /// </summary>
    public static PlotAxis ForMagnitudes(AxisScale requested, IEnumerable<double> values) =>
        Resolve(requested, values.ToList(), positive => positive.Length >= 2 && positive.Max() / positive.Min() >= 1e3);

    /// <summary>The plot coordinate of <paramref name="value"/>, or null when it cannot be drawn.</summary>
    public double? Map(double value)
    {
        if (!double.IsFinite(value))
        {
            return null;
        }
        if (!IsLog)
        {
            return value;
        }
        return value > 0 ? Math.Log10(value) : null;
    }

    /// <summary>The points that can be drawn, mapped on both axes.</summary>
    public static (double[] X, double[] Y) MapPoints(PlotAxis xAxis, PlotAxis yAxis, IReadOnlyList<double> xs, IReadOnlyList<double> ys)
    {
        var px = new List<double>(xs.Count);
        var py = new List<double>(xs.Count);
        for (var k = 0; k < xs.Count; k++)
        {
            if (xAxis.Map(xs[k]) is { } x && yAxis.Map(ys[k]) is { } y)
            {
                px.Add(x);
                py.Add(y);
            }
        }
        return (px.ToArray(), py.ToArray());
    }

    /// <summary>Puts decade ticks on <paramref name="axis"/> when logarithmic.</summary>
    public void Style(IAxis axis)
    {
        if (IsLog)
        {
            axis.TickGenerator = new DecadeTickGenerator();
        }
    }

    private static PlotAxis Resolve(AxisScale requested, IReadOnlyList<double> values, Func<double[], bool> wantsLog)
    {
        if (requested != AxisScale.Auto)
        {
            return new PlotAxis(requested == AxisScale.Log);
        }
        var finite = values.Where(double.IsFinite).ToArray();
        if (finite.Length == 0)
        {
            return new PlotAxis(false);
        }
        var largest = finite.Max(Math.Abs);
        if (finite.Any(v => v < -_roundingNoise * largest))
        {
            return new PlotAxis(false);
        }
        return new PlotAxis(wantsLog(finite.Where(v => v > 0).ToArray()));
    }
}
