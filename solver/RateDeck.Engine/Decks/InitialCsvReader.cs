using CsvHelper;

namespace RateDeck.Decks;

/// <summary>
/// Reads initial populations from a CSV file named by <c>[initial] csv</c>: a header naming the
/// columns <c>state</c> and <c>population</c> (any order), then one row per state given, the state
/// as its label or its one-based state number (as everywhere in a deck). States not listed start
/// empty; the values are taken as given, not normalised (like <c>[initial] values</c>). Lines
/// starting with <c>#</c> are comments. Every problem is reported at <c>csvfile:line:column</c>.
/// </summary>
internal static class InitialCsvReader
{
    private static readonly string[] _columns = ["state", "population"];

    /// <summary>P(0) in grid order, from the file at <paramref name="fullPath"/> (shown as <paramref name="displayPath"/>).</summary>
    public static double[] Read(string displayPath, string fullPath, SourceSpan reference, StateNames states) =>
        DeckCsv.Read(displayPath, fullPath, reference, "initial population file", (reader, file) => ReadRows(reader, file, states));

    private static double[] ReadRows(CsvReader reader, CsvFile file, StateNames states)
    {
        if (!reader.Read())
        {
            throw new DeckException(new SourceSpan(file.Path, 1, 1), "the initial population file is empty; it needs a header line `state,population` and one row per state");
        }

        var headerLine = (int)reader.LineNumber;
        var header = DeckCsv.ReadHeader(reader, file, _columns);
        var (stateColumn, populationColumn) = (header["state"], header["population"]);
        var populations = new double[states.Count];
        var givenOnLine = new int[states.Count];
        while (reader.Read())
        {
            if (reader.FieldCount != _columns.Length)
            {
                var at = reader.FieldCount > _columns.Length ? file.Cell(reader, _columns.Length) : file.Cell(reader, 0);
                throw new DeckException(at, $"this row has {reader.FieldCount} cells; every row needs {_columns.Length}: state,population");
            }

            var state = DeckCsv.State(reader, file, states, stateColumn);
            var line = (int)reader.LineNumber;
            if (givenOnLine[state] != 0)
            {
                throw new DeckException(file.Cell(reader, stateColumn), $"the population of this state is already given on line {givenOnLine[state]}; give each state once");
            }

            var span = file.Cell(reader, populationColumn);
            populations[state] = DeckCsv.NonNegativeNumber(DeckCsv.NonEmpty(reader, populationColumn, span), span, "population", "0.25", "give a value or leave the row out (a state not listed starts at 0)");
            givenOnLine[state] = line;
        }

        return givenOnLine.Any(line => line != 0)
            ? populations
            : throw new DeckException(new SourceSpan(file.Path, headerLine, 1), "the initial population file has a header but no rows; add rows state,population");
    }
}
