using System.Globalization;
using CsvHelper;
using RateDeck.Text;

namespace RateDeck.Decks;

/// <summary>
/// What the CSV files a deck names share: reading the file (comments start with <c>#</c>, cells
/// may be quoted as in RFC 4180, spaces around cells are ignored), the header of named columns,
/// state cells (a label or a one-based state number) and number cells. Every problem is a
/// <see cref="DeckException"/> at <c>file:line:column</c> of the offending cell.
/// </summary>
internal static class DeckCsv
{
    /// <summary>
    /// Reads the file at <paramref name="fullPath"/> (shown as <paramref name="displayPath"/>) and
    /// hands its records to <paramref name="readRows"/>; <paramref name="what"/> names the file in a
    /// message ("rate file"), at <paramref name="reference"/> (the deck's value naming it).
    /// <paramref name="readPlain"/>, when given, is tried first on the checked bytes; it returns
    /// null for a file it does not read as <paramref name="readRows"/> would.
    /// </summary>
    public static T Read<T>(string displayPath, string fullPath, SourceSpan reference, string what, Func<CsvReader, CsvFile, T> readRows, Func<byte[], T?>? readPlain = null)
        where T : class
    {
        var looked = fullPath == displayPath ? "" : $"; looked for {fullPath}";
        var bytes = InputFile.ReadAllBytes(fullPath, reason => new DeckException(reference, $"cannot read the {what} {displayPath} ({reason}{looked})"));
        InputFile.CheckText(bytes, displayPath);
        if (readPlain?.Invoke(bytes) is { } plain)
        {
            return plain;
        }

        var options = new CsvReaderOptions
        {
            Separator = ',',
            HasHeader = false,
            CommentPrefix = '#',
            TrimWhitespace = true,
            TrackLineNumbers = true,
            MalformedData = CsvMalformedDataHandling.Throw,
        };
        var file = new CsvFile(displayPath, bytes);
        try
        {
            using var reader = CsvReader.Create(bytes, options);
            return readRows(reader, file);
        }
        catch (CsvFormatException e)
        {
            throw new DeckException(file.SpanAtByte(e.ByteOffset), $"the CSV cannot be read: {e.Message}");
        }
    }

    /// <summary>The column index of each of <paramref name="columns"/> in the current record, the header (any order, no others).</summary>
    public static Dictionary<string, int> ReadHeader(CsvReader reader, CsvFile file, string[] columns)
    {
        var expected = string.Join(",", columns);
        var header = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var k = 0; k < reader.FieldCount; k++)
        {
            var name = reader.GetString(k);
            var span = file.Cell(reader, k);
            if (!columns.Contains(name))
            {
                throw new DeckException(span, $"unknown column `{name}`.{Suggestions.Hint(name, columns)} The header must name the columns {expected}.");
            }

            if (!header.TryAdd(name, k))
            {
                throw new DeckException(span, $"the column `{name}` is named twice");
            }
        }

        foreach (var column in columns)
        {
            if (!header.ContainsKey(column))
            {
                throw new DeckException(file.Cell(reader, 0), $"the header lacks the column `{column}`; it must name {expected}");
            }
        }

        return header;
    }

    /// <summary>The state named in cell <paramref name="index"/>; its position is computed only to report a problem.</summary>
    public static int State(CsvReader reader, CsvFile file, StateNames states, int index)
    {
        var text = reader.GetString(index);
        if (text.Length > 0 && states.TryResolve(text, out var state))
        {
            return state;
        }

        var span = file.Cell(reader, index);
        return states.Resolve(NonEmpty(reader, index, span), span);
    }

    /// <summary>The text of cell <paramref name="index"/>, which must not be empty.</summary>
    public static string NonEmpty(CsvReader reader, int index, SourceSpan span)
    {
        var text = reader.GetString(index);
        return text.Length > 0 ? text : throw new DeckException(span, "this cell is empty");
    }

    /// <summary>
    /// A finite number >= 0 from <paramref name="text"/>: <paramref name="noun"/> names it in a
    /// message ("rate"), <paramref name="example"/> shows how to write one, <paramref name="ifNaN"/>
    /// says what to do instead of NaN.
    /// </summary>
    public static double NonNegativeNumber(string text, SourceSpan span, string noun, string example, string ifNaN)
    {
        if (!double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var value))
        {
            throw new DeckException(span, $"`{text}` is not a number; a {noun} is written like {example}");
        }

        if (double.IsNaN(value))
        {
            throw new DeckException(span, $"a {noun} cannot be NaN; {ifNaN}");
        }

        if (double.IsInfinity(value))
        {
            throw new DeckException(span, $"a {noun} must be finite");
        }

        return value >= 0 ? value : throw new DeckException(span, $"a {noun} cannot be negative ({text}); {noun}s are >= 0");
    }
}
