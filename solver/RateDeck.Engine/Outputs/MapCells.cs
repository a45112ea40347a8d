namespace RateDeck.Outputs;

/// <summary>
/// The cells of one heat-map axis. Each sample owns the interval between the midpoints to its
/// neighbours (the end cells mirrored). ScottPlot's heat map needs equal cells, so samples on a
/// non-uniform grid are spread over enough equal cells that the narrowest sample still gets one
/// (at most <see cref="_maxCells"/>); each equal cell shows the sample that owns its centre.
/// </summary>
internal sealed class MapCells
{
    private const int _maxCells = 2048;

    // Spacings equal to this relative tolerance count as a uniform grid (one cell per sample).
    private const double _uniformTolerance = 1e-6;

    private MapCells(double low, double high, int[] owners)
    {
        Low = low;
        High = high;
        Owners = owners;
    }

    /// <summary>The outer edge of the first cell.</summary>
    public double Low { get; }

    /// <summary>The outer edge of the last cell.</summary>
    public double High { get; }

    /// <summary>For each equal cell, the index of the sample shown in it.</summary>
    public int[] Owners { get; }

    /// <summary>Cells for strictly ascending <paramref name="positions"/> (plot coordinates).</summary>
    public static MapCells For(IReadOnlyList<double> positions, string what)
    {
        var n = positions.Count;
        if (n == 0)
        {
            throw new ArgumentException($"No {what} can be drawn on this axis.");
        }
        for (var k = 1; k < n; k++)
        {
            if (!(positions[k] > positions[k - 1]))
            {
                throw new ArgumentException($"The {what} must be strictly ascending (entry {k} is not).");
            }
        }
        if (n == 1)
        {
            return new MapCells(positions[0] - 0.5, positions[0] + 0.5, [0]);
        }
        var edges = new double[n + 1];
        edges[0] = positions[0] - (positions[1] - positions[0]) / 2;
        edges[n] = positions[n - 1] + (positions[n - 1] - positions[n - 2]) / 2;
        var narrowest = double.PositiveInfinity;
        var widest = 0.0;
        for (var k = 1; k < n; k++)
        {
            edges[k] = (positions[k - 1] + positions[k]) / 2;
            narrowest = Math.Min(narrowest, positions[k] - positions[k - 1]);
            widest = Math.Max(widest, positions[k] - positions[k - 1]);
        }
        if (widest - narrowest <= _uniformTolerance * widest)
        {
            return new MapCells(edges[0], edges[n], Enumerable.Range(0, n).ToArray());
        }
        var count = (int)Math.Clamp(Math.Ceiling((edges[n] - edges[0]) / narrowest), n, _maxCells);
        var owners = new int[count];
        var width = (edges[n] - edges[0]) / count;
        var owner = 0;
        for (var cell = 0; cell < count; cell++)
        {
            var centre = edges[0] + (cell + 0.5) * width;
            while (owner < n - 1 && centre >= edges[owner + 1])
            {
                owner++;
            }
            owners[cell] = owner;
        }
        return new MapCells(edges[0], edges[n], owners);
    }
}
