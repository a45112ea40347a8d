using System.Globalization;

namespace RateDeck.Decks;

/// <summary>
/// Reads [states]: either an explicit list of coordinates (with optional labels) or a generated
/// linear or logarithmic grid, and computes each state's cell width.
/// </summary>
internal static class GridReader
{
    private static readonly string[] _generatorKeys = ["spacing", "count", "from", "to", "label_prefix"];

    public static GridSpec Read(DeckSection states)
    {
        if (!states.Exists)
        {
            throw new DeckException(states.Span, "the deck needs a [states] table: coordinates = [...] or spacing, count, from and to");
        }

        return states.Has("coordinates") ? ReadExplicit(states) : ReadGenerated(states);
    }

    private static GridSpec ReadExplicit(DeckSection states)
    {
        foreach (var key in _generatorKeys)
        {
            states.Forbid(key, "[states] lists its coordinates; remove this key, or remove `coordinates` to generate a grid");
        }

        var array = states.Array("coordinates")!;
        if (array.Items.Count == 0)
        {
            throw new DeckException(array.Span, "`states.coordinates` is empty; list at least one state");
        }

        var x = array.Items.Select(item => DeckSection.AsNumber(item, "states.coordinates")).ToArray();
        for (var k = 1; k < x.Length; k++)
        {
            if (x[k] <= x[k - 1])
            {
                throw new DeckException(array.Items[k].Span, $"coordinates must increase strictly: {DeckSection.Format(x[k])} follows {DeckSection.Format(x[k - 1])}");
            }
        }

        var labels = ReadLabels(states, x.Length) ?? DefaultLabels("s", x.Length);
        return new GridSpec(x, labels, ExplicitCellWidths(x), states.Span);
    }

    private static GridSpec ReadGenerated(DeckSection states)
    {
        var spacing = states.Word("spacing", ["linear", "log"]) ?? throw states.Missing("spacing", "\"linear\" or \"log\", or give coordinates = [...] instead");
        var countNode = states.Require("count", "the number of states");
        var count = DeckSection.AsInteger(countNode, "states.count");
        if (count < 1 || count > 1_000_000)
        {
            throw new DeckException(countNode.Span, $"`states.count` must be between 1 and 1000000, not {count}");
        }

        var from = states.RequireNumber("from");
        var to = states.RequireNumber("to");
        if (to <= from)
        {
            throw new DeckException(states.Entry("to")!.Value.Span, $"`states.to` ({DeckSection.Format(to)}) must be larger than `states.from` ({DeckSection.Format(from)})");
        }

        var log = spacing == "log";
        if (log && from <= 0)
        {
            throw new DeckException(states.Entry("from")!.Value.Span, $"a logarithmic grid needs `states.from` > 0, not {DeckSection.Format(from)}");
        }

        var n = (int)count;
        var (x, widths) = log ? LogGrid(from, to, n) : LinearGrid(from, to, n);

        string[] labels;
        if (states.Has("labels"))
        {
            states.Forbid("label_prefix", "[states] gives its labels; remove `label_prefix` or `labels`");
            labels = ReadLabels(states, n)!;
        }
        else
        {
            var prefix = states.String("label_prefix");
            labels = DefaultLabels(prefix is null ? "s" : ValidLabel((string)prefix.Value, prefix.ContentSpan, prefix: true), n);
        }

        return new GridSpec(x, labels, widths, states.Span) { Spacing = log ? GridSpacing.Logarithmic : GridSpacing.Linear };
    }

    /// <summary>
    /// n points from <paramref name="from"/> to <paramref name="to"/> inclusive, all cells of width
    /// (to - from) / (n - 1); a single state sits at <paramref name="from"/> with width to - from.
    /// </summary>
    private static (double[] X, double[] Widths) LinearGrid(double from, double to, int n)
    {
        var x = new double[n];
        var step = n == 1 ? to - from : (to - from) / (n - 1);
        for (var k = 0; k < n; k++)
        {
            x[k] = from + k * step;
        }

        if (n > 1)
        {
            x[^1] = to;
        }

        return (x, Enumerable.Repeat(step, n).ToArray());
    }

    /// <summary>
    /// n points spaced evenly in ln x from <paramref name="from"/> to <paramref name="to"/>
    /// inclusive; the cell width is x_k * d(ln x) with d(ln x) = ln(to / from) / (n - 1).
    /// A single state sits at <paramref name="from"/> with width to - from.
    /// </summary>
    private static (double[] X, double[] Widths) LogGrid(double from, double to, int n)
    {
        if (n == 1)
        {
            return ([from], [to - from]);
        }

        var x = new double[n];
        var widths = new double[n];
        var dLog = Math.Log(to / from) / (n - 1);
        for (var k = 0; k < n; k++)
        {
            x[k] = k == n - 1 ? to : from * Math.Exp(k * dLog);
            widths[k] = x[k] * dLog;
        }

        return (x, widths);
    }

    /// <summary>
    /// Half the distance between a state's two neighbours; an end cell is mirrored, so its width is
    /// the distance to its one neighbour. A single listed state has width 1.
    /// </summary>
    private static double[] ExplicitCellWidths(double[] x)
    {
        var n = x.Length;
        if (n == 1)
        {
            return [1.0];
        }

        var widths = new double[n];
        widths[0] = x[1] - x[0];
        widths[^1] = x[^1] - x[^2];
        for (var k = 1; k < n - 1; k++)
        {
            widths[k] = 0.5 * (x[k + 1] - x[k - 1]);
        }

        return widths;
    }

    private static string[]? ReadLabels(DeckSection states, int count)
    {
        if (states.Array("labels") is not { } array)
        {
            return null;
        }

        if (array.Items.Count != count)
        {
            throw new DeckException(array.Span, $"`states.labels` has {array.Items.Count} labels but there are {count} states");
        }

        var labels = new string[count];
        var seen = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var k = 0; k < count; k++)
        {
            var scalar = DeckSection.AsString(array.Items[k], "states.labels");
            var label = ValidLabel((string)scalar.Value, scalar.ContentSpan, prefix: false);
            if (seen.TryGetValue(label, out var first))
            {
                throw new DeckException(scalar.ContentSpan, $"duplicate state `{label}`: state {first + 1} already has this label");
            }

            seen[label] = k;
            labels[k] = label;
        }

        return labels;
    }

    /// <summary>
    /// A label must be non-empty, free of spaces, commas and quotes (it is written in CSV cells and
    /// column headers), and not a plain number, which CSV cells read as a state number.
    /// </summary>
    private static string ValidLabel(string label, SourceSpan span, bool prefix)
    {
        var what = prefix ? "`states.label_prefix`" : "a state label";
        if (label.Length == 0)
        {
            throw new DeckException(span, $"{what} cannot be empty");
        }

        if (label.Any(c => char.IsWhiteSpace(c) || c is ',' or '"' or '\''))
        {
            throw new DeckException(span, $"{what} cannot contain spaces, commas or quotes: \"{label}\"");
        }

        if (!prefix && label.All(char.IsAsciiDigit))
        {
            throw new DeckException(span, $"a state label cannot be a plain number (\"{label}\"): a number in a CSV cell means a state's position; use a name such as \"v{label}\"");
        }

        return label;
    }

    private static string[] DefaultLabels(string prefix, int count)
        => Enumerable.Range(1, count).Select(k => prefix + k.ToString(CultureInfo.InvariantCulture)).ToArray();
}
