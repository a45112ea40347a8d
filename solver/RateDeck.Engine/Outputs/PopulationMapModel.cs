using static RateDeck.Text.Format;

namespace RateDeck.Outputs;

/// <summary>
/// What the population map shows: log10 of each drawn population per cell (NaN where grey), the
/// cells of both axes, and the colour scale with its label. The colour bar's ticks are
/// populations (10ⁿ at the whole decades of log10), so its label names the population, not its
/// logarithm.
/// </summary>
internal sealed record PopulationMapModel(PlotAxis X, PlotAxis Y, MapCells Columns, MapCells Rows, double[,] Intensities,
    double ColourLow, double ColourHigh, string ColourLabel)
{
    /// <summary>
    /// The map of <paramref name="populations"/> (<c>[time][state]</c>) over strictly ascending
    /// <paramref name="times"/> and <paramref name="stateAxis"/>.
    /// </summary>
    public static PopulationMapModel Build(PlotText text, double[] times, double[] stateAxis, double[][] populations, PlotOptions options)
    {
        ArgumentNullException.ThrowIfNull(text);
        ArgumentNullException.ThrowIfNull(times);
        ArgumentNullException.ThrowIfNull(stateAxis);
        ArgumentNullException.ThrowIfNull(populations);
        if (populations.Length != times.Length || populations.Any(row => row is null || row.Length != stateAxis.Length))
        {
            throw new ArgumentException($"Expected {times.Length} population rows of {stateAxis.Length} values each.");
        }

        var floor = options.Floor?.Value ?? 0;
        var x = PlotAxis.ForGrid(options.XScale, times);
        var y = PlotAxis.ForGrid(options.YScale, stateAxis);
        var columns = DrawableIndices(x, times);
        var rows = DrawableIndices(y, stateAxis);
        var xCells = MapCells.For(columns.Select(k => x.Map(times[k])!.Value).ToArray(), "times");
        var yCells = MapCells.For(rows.Select(i => y.Map(stateAxis[i])!.Value).ToArray(), "state coordinates");

        var intensities = new double[yCells.Owners.Length, xCells.Owners.Length];
        var high = double.NegativeInfinity;
        var grey = false;
        for (var r = 0; r < yCells.Owners.Length; r++)
        {
            // Row 0 of a ScottPlot heat map is drawn at the top, where the largest coordinate belongs.
            var state = rows[yCells.Owners[^(r + 1)]];
            for (var c = 0; c < xCells.Owners.Length; c++)
            {
                var p = populations[columns[xCells.Owners[c]]][state];
                var value = p > floor && double.IsFinite(p) ? Math.Log10(p) : double.NaN;
                intensities[r, c] = value;
                grey |= double.IsNaN(value);
                if (!double.IsNaN(value))
                {
                    high = Math.Max(high, value);
                }
            }
        }

        if (!double.IsFinite(high))
        {
            high = 0;
        }

        // From the lowest coloured value (no lower than MaxDecades below the top) to the top.
        var lowest = Enumerable.Range(0, intensities.GetLength(0)).SelectMany(r => Enumerable.Range(0, intensities.GetLength(1)).Select(c => intensities[r, c]))
            .Where(v => !double.IsNaN(v)).DefaultIfEmpty(high).Min();
        var low = Math.Max(lowest, high - options.MaxDecades);
        if (low >= high)
        {
            low = high - 1;
        }
        var label = text.ValueLabel ?? "population";
        if (grey)
        {
            label += floor > 0 ? $" (grey: ≤ {Number(floor)}, not resolved)" : " (grey: ≤ 0)";
        }

        return new PopulationMapModel(x, y, xCells, yCells, intensities, low, high, label);
    }

    private static int[] DrawableIndices(PlotAxis axis, double[] values) =>
        Enumerable.Range(0, values.Length).Where(k => axis.Map(values[k]) is not null).ToArray();
}
