using System.Globalization;
using System.Text;
using CsvHelper;
using RateDeck.Text;

namespace RateDeck.Decks;

/// <summary>
/// Reads a coefficient file: a header naming the columns <c>from</c>, <c>to</c> and <c>rate</c>
/// (any order), then one row per rate. A state cell holds a label or a one-based state number.
/// Lines starting with <c>#</c> are comments. Every problem is reported as
/// <c>csvfile:line:column</c> of the offending cell.
/// </summary>
internal static class RateCsvReader
{
    private static readonly string[] _columns = ["from", "to", "rate"];

    /// <summary>What the rows must satisfy besides being well formed.</summary>
    /// <param name="Direction">For one-way data, the direction every row must go; null for a full matrix.</param>
    public sealed record Rules(TransferDirection? Direction);

    public static IReadOnlyList<RateEntry> Read(string displayPath, string fullPath, SourceSpan reference, StateNames states, Rules rules)
    {
        var looked = fullPath == displayPath ? "" : $"; looked for {fullPath}";
        var bytes = InputFile.ReadAllBytes(fullPath, reason => new DeckException(reference, $"cannot read the rate file {displayPath} ({reason}{looked})"));
        InputFile.CheckText(bytes, displayPath);

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
            return ReadRows(reader, file, states, rules);
        }
        catch (CsvFormatException e)
        {
            throw new DeckException(file.SpanAtByte(e.ByteOffset), $"the CSV cannot be read: {e.Message}");
        }
    }

    private static RateEntryTable ReadRows(CsvReader reader, CsvFile file, StateNames states, Rules rules)
    {
        if (!reader.Read())
        {
            throw new DeckException(new SourceSpan(file.Path, 1, 1), "the rate file is empty; it needs a header line `from,to,rate` and one row per rate");
        }

        var headerLine = (int)reader.LineNumber;
        var header = ReadHeader(reader, file);
        // One row a line: the line count bounds the rows, so the table is sized once.
        var entries = new RateEntryTable(file.Path, file.LineCount);
        var given = new PairSet(states.Count);
        var (fromColumn, toColumn, rateColumn) = (header["from"], header["to"], header["rate"]);
        while (reader.Read())
        {
            if (reader.FieldCount != _columns.Length)
            {
                var at = reader.FieldCount > _columns.Length ? file.Cell(reader, _columns.Length) : file.Cell(reader, 0);
                throw new DeckException(at, $"this row has {reader.FieldCount} cells; every row needs {_columns.Length}: from,to,rate");
            }

            // The state cells' positions are worked out only for an error message; the rate cell's is kept.
            var from = ResolveState(reader, file, states, fromColumn);
            var to = ResolveState(reader, file, states, toColumn);
            var rateSpan = file.Cell(reader, rateColumn);
            var rate = ParseRate(NonEmpty(reader, rateColumn, rateSpan), rateSpan);

            if (from == to)
            {
                throw new DeckException(file.Cell(reader, toColumn), "a state cannot have a rate to itself: the diagonal of the rate matrix follows from conservation; remove this row");
            }

            if (rules.Direction is { } direction && (direction == TransferDirection.TowardSmaller ? to > from : to < from))
            {
                var declared = direction == TransferDirection.TowardSmaller ? "toward_smaller" : "toward_larger";
                throw new DeckException(file.Cell(reader, toColumn), $"this row goes against the declared direction = \"{declared}\" (the reverse rates are completed by detailed balance); fix the row or the direction");
            }

            if (!given.Add(from, to))
            {
                // Rare: search for the first row only when there is one to report.
                var line = entries.FirstLineOf(from, to);
                throw new DeckException(file.Cell(reader, fromColumn), $"the rate from this state to that one is already given on line {line}; give each pair once");
            }

            entries.Add(from, to, rate, rateSpan);
        }

        if (entries.Count == 0)
        {
            throw new DeckException(new SourceSpan(file.Path, headerLine, 1), "the rate file has a header but no rates; add rows from,to,rate");
        }

        return entries;
    }

    private static Dictionary<string, int> ReadHeader(CsvReader reader, CsvFile file)
    {
        var header = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var k = 0; k < reader.FieldCount; k++)
        {
            var name = reader.GetString(k);
            var span = file.Cell(reader, k);
            if (!_columns.Contains(name))
            {
                throw new DeckException(span, $"unknown column `{name}`.{Suggestions.Hint(name, _columns)} The header must name the columns from,to,rate.");
            }

            if (!header.TryAdd(name, k))
            {
                throw new DeckException(span, $"the column `{name}` is named twice");
            }
        }

        foreach (var column in _columns)
        {
            if (!header.ContainsKey(column))
            {
                throw new DeckException(file.Cell(reader, 0), $"the header lacks the column `{column}`; it must name from,to,rate");
            }
        }

        return header;
    }

    /// <summary>The state named in cell <paramref name="index"/>; its position is computed only to report a problem.</summary>
    private static int ResolveState(CsvReader reader, CsvFile file, StateNames states, int index)
    {
        var text = reader.GetString(index);
        if (text.Length > 0 && states.TryResolve(text, out var state))
        {
            return state;
        }

        var span = file.Cell(reader, index);
        return states.Resolve(NonEmpty(reader, index, span), span);
    }

    private static string NonEmpty(CsvReader reader, int index, SourceSpan span)
    {
        var text = reader.GetString(index);
        return text.Length > 0 ? text : throw new DeckException(span, "this cell is empty");
    }

    private static double ParseRate(string text, SourceSpan span)
    {
        if (!double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var rate))
        {
            throw new DeckException(span, $"`{text}` is not a number; a rate is written like 2.5e3");
        }

        if (double.IsNaN(rate))
        {
            throw new DeckException(span, "a rate cannot be NaN; give a measured value or leave the row out");
        }

        if (double.IsInfinity(rate))
        {
            throw new DeckException(span, "a rate must be finite");
        }

        if (rate < 0)
        {
            throw new DeckException(span, $"a rate cannot be negative ({text}); rates are >= 0");
        }

        return rate;
    }

    /// <summary>The file's bytes, to turn byte offsets into one-based lines and character columns.</summary>
    private sealed class CsvFile(string path, byte[] bytes)
    {
        private int _cursor;
        private int _cursorLine = 1;
        private int _cursorLineStart;

        public string Path { get; } = path;

        /// <summary>Number of line breaks, plus one.</summary>
        public int LineCount => bytes.AsSpan().Count((byte)'\n') + 1;

        /// <summary>
        /// The span of cell <paramref name="index"/> of the current record: its first character
        /// after leading spaces. The raw fields joined by separators are the raw record, so the
        /// cell starts after the raw fields before it and one separator each.
        /// </summary>
        public SourceSpan Cell(CsvReader reader, int index)
        {
            var offset = reader.ByteOffset;
            for (var k = 0; k < index; k++)
            {
                offset += reader.GetRawSpan(k).Length + 1;
            }

            var raw = reader.GetRawSpan(index);
            var lead = 0;
            while (lead < raw.Length && raw[lead] is (byte)' ' or (byte)'\t')
            {
                lead++;
            }

            return SpanAtByte(offset + lead);
        }

        /// <summary>
        /// Line and column of a byte offset. Lines are counted from a cursor left by the previous
        /// call (restarting from the top only when asked for an earlier line), so that reading a
        /// file cell by cell costs O(file size) in all, not O(size) per cell.
        /// </summary>
        public SourceSpan SpanAtByte(long offset)
        {
            var end = (int)Math.Clamp(offset, 0, bytes.Length);
            if (end < _cursorLineStart)
            {
                (_cursor, _cursorLine, _cursorLineStart) = (0, 1, 0);
            }

            var newline = _cursor >= end ? -1 : bytes.AsSpan(_cursor, end - _cursor).LastIndexOf((byte)'\n');
            if (newline >= 0)
            {
                _cursorLine += bytes.AsSpan(_cursor, newline + 1).Count((byte)'\n');
                _cursorLineStart = _cursor + newline + 1;
            }

            _cursor = Math.Max(_cursor, end);
            var (line, lineStart) = (_cursorLine, _cursorLineStart);

            // Skip a byte order mark so that columns count what an editor shows.
            var bom = lineStart == 0 && bytes.AsSpan().StartsWith((ReadOnlySpan<byte>)[0xEF, 0xBB, 0xBF]) ? 3 : 0;
            var from = Math.Min(lineStart + bom, end);
            var column = Encoding.UTF8.GetCharCount(bytes, from, end - from) + 1;
            return new SourceSpan(Path, line, column);
        }
    }
}
