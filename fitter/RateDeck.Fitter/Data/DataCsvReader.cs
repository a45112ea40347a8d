using System.Globalization;
using System.Text;
using RateDeck.Decks;

namespace RateDeck.Fitting.Data;

/// <summary>
/// Reads a data CSV: comment lines start with #, the first other line is the header, then one row
/// per time. The header names the time column and the observed columns; a column NAME_sd holds
/// the standard deviations of NAME (weights 1/sd^2). An empty cell means "not observed at this
/// time". Every problem names the file, line and column.
/// </summary>
public static class DataCsvReader
{
    /// <summary>The suffix of a standard-deviation column.</summary>
    public const string DeviationSuffix = "_sd";

    /// <summary>
    /// Reads <paramref name="path"/>; <paramref name="knownNames"/> are the names a column may take
    /// (state labels and observables) and <paramref name="origin"/> is where the file is named in the deck.
    /// </summary>
    /// <exception cref="DeckException">The file is missing or malformed.</exception>
    public static DataTable Read(string path, string timeColumn, IReadOnlyCollection<string> knownNames, SourceSpan origin)
    {
        string[] lines;
        try
        {
            lines = File.ReadAllLines(path, new UTF8Encoding(false, true));
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            var reason = e is FileNotFoundException or DirectoryNotFoundException ? "there is no such file" : e.Message;
            throw new DeckException(origin, $"cannot read the data file {path}: {reason}");
        }

        var header = -1;
        for (var k = 0; k < lines.Length && header < 0; k++)
        {
            if (!IsBlankOrComment(lines[k]))
            {
                header = k;
            }
        }

        if (header < 0)
        {
            throw new DeckException(new SourceSpan(path, 1, 1), "the data file has no header line; write the column names first, like t,B,B_sd");
        }

        var (names, starts) = Split(lines[header]);
        var timeIndex = Array.IndexOf(names, timeColumn);
        if (timeIndex < 0)
        {
            throw new DeckException(new SourceSpan(path, header + 1, 1), $"the header has no time column `{timeColumn}`; name it so, or set `time = \"...\"` in the data set's table");
        }

        var columns = ClassifyColumns(path, header, names, starts, timeIndex, knownNames);
        var times = columns.ToDictionary(c => c.Name, _ => new List<double>());
        var values = columns.ToDictionary(c => c.Name, _ => new List<double>());
        var deviations = columns.ToDictionary(c => c.Name, _ => new List<double>());
        for (var k = header + 1; k < lines.Length; k++)
        {
            if (IsBlankOrComment(lines[k]))
            {
                continue;
            }

            var (cells, cellStarts) = Split(lines[k]);
            if (cells.Length != names.Length)
            {
                throw new DeckException(new SourceSpan(path, k + 1, 1), $"this row has {cells.Length} cells but the header has {names.Length}; give every column (an empty cell means not observed)");
            }

            var t = Number(cells[timeIndex], path, k, cellStarts[timeIndex], "time") ?? throw new DeckException(new SourceSpan(path, k + 1, cellStarts[timeIndex]), "the time cell is empty");
            if (t < 0)
            {
                throw new DeckException(new SourceSpan(path, k + 1, cellStarts[timeIndex]), "a time must be zero or more (t = 0 is the deck's initial state)");
            }

            foreach (var column in columns)
            {
                var value = Number(cells[column.Index], path, k, cellStarts[column.Index], column.Name);
                var sd = column.DeviationIndex is { } d ? Number(cells[d], path, k, cellStarts[d], column.Name + DeviationSuffix) : null;
                if (value is null)
                {
                    continue;
                }

                if (column.DeviationIndex is { } di && !(sd > 0))
                {
                    throw new DeckException(new SourceSpan(path, k + 1, cellStarts[di]), $"the standard deviation of {column.Name} must be given and above zero wherever {column.Name} is");
                }

                times[column.Name].Add(t);
                values[column.Name].Add(value.Value);
                if (sd is { } given)
                {
                    deviations[column.Name].Add(given);
                }
            }
        }

        var series = columns
            .Where(c => values[c.Name].Count > 0)
            .Select(c => new ObservedSeries(c.Name, [.. times[c.Name]], [.. values[c.Name]], c.DeviationIndex is null ? null : [.. deviations[c.Name]]))
            .ToList();
        return series.Count > 0
            ? new DataTable(path, series)
            : throw new DeckException(new SourceSpan(path, header + 1, 1), "the data file has no observed values below its header");
    }

    private sealed record Column(string Name, int Index, int? DeviationIndex);

    private static List<Column> ClassifyColumns(string path, int header, string[] names, int[] starts, int timeIndex, IReadOnlyCollection<string> knownNames)
    {
        var columns = new List<Column>();
        for (var c = 0; c < names.Length; c++)
        {
            var name = names[c];
            if (c == timeIndex || name.EndsWith(DeviationSuffix, StringComparison.Ordinal) && names.Contains(name[..^DeviationSuffix.Length]))
            {
                continue;
            }

            if (!knownNames.Contains(name))
            {
                throw new DeckException(
                    new SourceSpan(path, header + 1, starts[c]),
                    $"column `{name}` is neither a state label nor an observable of [fit.observables].{Text.Suggestions.Hint(name, knownNames)} Name each column after a state (its population) or an observable, and a standard deviation column NAME{DeviationSuffix}.");
            }

            if (columns.Any(existing => existing.Name == name))
            {
                throw new DeckException(new SourceSpan(path, header + 1, starts[c]), $"column `{name}` appears twice in the header");
            }

            var deviation = Array.IndexOf(names, name + DeviationSuffix);
            columns.Add(new Column(name, c, deviation < 0 ? null : deviation));
        }

        return columns.Count > 0
            ? columns
            : throw new DeckException(new SourceSpan(path, header + 1, 1), "the header names no observed column besides the time");
    }

    private static double? Number(string cell, string path, int line, int column, string what)
    {
        if (cell.Length == 0)
        {
            return null;
        }

        return double.TryParse(cell, NumberStyles.Float, CultureInfo.InvariantCulture, out var value) && double.IsFinite(value)
            ? value
            : throw new DeckException(new SourceSpan(path, line + 1, column), $"`{cell}` is not a finite number ({what}); write numbers like 0.25 or 1.5e-3, or leave the cell empty");
    }

    private static bool IsBlankOrComment(string line)
    {
        var trimmed = line.TrimStart();
        return trimmed.Length == 0 || trimmed[0] == '#';
    }

    /// <summary>The trimmed cells of a line and the one-based column where each starts.</summary>
    private static (string[] Cells, int[] Starts) Split(string line)
    {
        var cells = new List<string>();
        var starts = new List<int>();
        var begin = 0;
        while (true)
        {
            var end = line.IndexOf(',', begin);
            var raw = end < 0 ? line[begin..] : line[begin..end];
            var lead = raw.Length - raw.TrimStart().Length;
            cells.Add(raw.Trim());
            starts.Add(begin + lead + 1);
            if (end < 0)
            {
                return ([.. cells], [.. starts]);
            }

            begin = end + 1;
        }
    }
}
