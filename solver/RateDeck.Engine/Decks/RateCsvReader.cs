using CsvHelper;

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

    /// <summary>
    /// The rows of the file: by <see cref="PlainRateCsv"/> when the file is plain and valid (a dense
    /// deck's file of millions of rows), else by the general CSV reader, which words any error.
    /// </summary>
    public static IReadOnlyList<RateEntry> Read(string displayPath, string fullPath, SourceSpan reference, StateNames states, Rules rules) =>
        DeckCsv.Read(displayPath, fullPath, reference, "rate file", (reader, file) => ReadRows(reader, file, states, rules),
            bytes => PlainRateCsv.TryRead(displayPath, bytes, states, rules));

    private static RateEntryTable ReadRows(CsvReader reader, CsvFile file, StateNames states, Rules rules)
    {
        if (!reader.Read())
        {
            throw new DeckException(new SourceSpan(file.Path, 1, 1), "the rate file is empty; it needs a header line `from,to,rate` and one row per rate");
        }

        var headerLine = (int)reader.LineNumber;
        var header = DeckCsv.ReadHeader(reader, file, _columns);
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
            var from = DeckCsv.State(reader, file, states, fromColumn);
            var to = DeckCsv.State(reader, file, states, toColumn);
            var rateSpan = file.Cell(reader, rateColumn);
            var rate = DeckCsv.NonNegativeNumber(DeckCsv.NonEmpty(reader, rateColumn, rateSpan), rateSpan, "rate", "2.5e3", "give a measured value or leave the row out");

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
}
