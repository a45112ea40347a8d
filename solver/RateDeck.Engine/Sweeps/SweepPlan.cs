using System.Globalization;
using RateDeck.Decks;

namespace RateDeck.Sweeps;

/// <summary>One point of a sweep: its number, its folder name and the value of every varied key.</summary>
/// <param name="Index">The point's number, from 0, in the order of <see cref="SweepPlan.Points"/>.</param>
/// <param name="Name">The folder name: <c>point-0007</c>, zero-padded so that names sort in point order.</param>
/// <param name="Overrides">One override per axis, in axis order; each one's <c>--set</c> text is what the point's outputs record.</param>
public sealed record SweepPoint(int Index, string Name, IReadOnlyList<DeckOverride> Overrides)
{
    /// <summary>The value of each axis at this point, as the <c>--set</c> text writes it (<c>0.3</c>).</summary>
    public IEnumerable<string> ValueTexts => Overrides.Select(o => o.ToString()[(o.Key.Length + 1)..]);
}

/// <summary>
/// The points of a sweep: the product of the axes (the last axis varies fastest, as nested loops in
/// the order given), or with <see cref="Zip"/> the axes walked together, value k of each at point k.
/// </summary>
/// <param name="Axes">The varied keys, in the order given.</param>
/// <param name="Zip">Walk the axes together (equal counts) instead of taking their product.</param>
public sealed record SweepPlan(IReadOnlyList<SweepAxis> Axes, bool Zip)
{
    /// <summary>The most points a sweep may have: a typo in a count should not fill a disk.</summary>
    public const int MaxPoints = 1_000_000;

    /// <summary>Checks the axes: at least one, each key once, equal counts with <paramref name="zip"/>, at most <see cref="MaxPoints"/> points.</summary>
    /// <exception cref="SweepSpecException">The axes do not make a sweep.</exception>
    public static SweepPlan Create(IReadOnlyList<SweepAxis> axes, bool zip)
    {
        ArgumentNullException.ThrowIfNull(axes);
        if (axes.Count == 0)
        {
            throw new SweepSpecException("is missing", "give at least one --vary key=start:stop:count");
        }

        if (axes.GroupBy(a => a.Key, StringComparer.Ordinal).FirstOrDefault(g => g.Count() > 1) is { } repeated)
        {
            throw new SweepSpecException(repeated.Last().ToString(), $"`{repeated.Key}` is varied twice; vary each key once");
        }

        if (zip && axes.Any(a => a.Count != axes[0].Count))
        {
            throw new SweepSpecException(axes.First(a => a.Count != axes[0].Count).ToString(),
                $"--zip walks the axes together, so every count must be equal ({string.Join(", ", axes.Select(a => $"{a.Key}: {a.Count}"))})");
        }

        var count = zip ? axes[0].Count : axes.Aggregate(1.0, (product, a) => product * a.Count);
        if (count > MaxPoints)
        {
            throw new SweepSpecException(axes[^1].ToString(), $"the sweep would have {count.ToString("R", CultureInfo.InvariantCulture)} points, above the limit of {MaxPoints.ToString(CultureInfo.InvariantCulture)}");
        }

        return new SweepPlan(axes, zip);
    }

    /// <summary>The points in order, each with its folder name.</summary>
    public IReadOnlyList<SweepPoint> Points()
    {
        var values = Axes.Select(a => a.Values()).ToArray();
        var count = Zip ? values[0].Count : values.Aggregate(1, (product, v) => product * v.Count);
        var width = Math.Max(4, (count - 1).ToString(CultureInfo.InvariantCulture).Length);
        var points = new SweepPoint[count];
        for (var index = 0; index < count; index++)
        {
            var overrides = new DeckOverride[Axes.Count];
            var rest = index;
            for (var a = Axes.Count - 1; a >= 0; a--)
            {
                var k = Zip ? index : rest % values[a].Count;
                rest = Zip ? rest : rest / values[a].Count;
                overrides[a] = Axes[a].Override(values[a][k]);
            }

            points[index] = new SweepPoint(index, "point-" + index.ToString(CultureInfo.InvariantCulture).PadLeft(width, '0'), overrides);
        }

        return points;
    }
}
