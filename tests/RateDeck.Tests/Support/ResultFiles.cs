namespace RateDeck.Tests.Support;

/// <summary>Reads what a run wrote, as a user's script would.</summary>
internal static class ResultFiles
{
    /// <summary>The data rows of a result CSV (provenance comments and the header skipped), each cell parsed as a number (inf and nan as the files write them).</summary>
    public static double[][] Rows(string path) =>
        [.. File.ReadAllLines(path).Where(l => !l.StartsWith('#')).Skip(1)
            .Select(line => line.Split(',').Select(c => RateDeck.Outputs.CsvNumber.TryParse(c, out var value) ? value : throw new FormatException($"not a number: {c}")).ToArray())];

    /// <summary>
    /// Writes a three-state deck (labels a, b, c at coordinates 1, 2, 3, kT = 1) whose full measured
    /// matrix is <paramref name="rateRows"/> ("from,to,rate" lines) and returns its path;
    /// <paramref name="tables"/> is appended (e.g. [initial] and [run]).
    /// </summary>
    public static string FullMatrixDeck(TempFolder folder, string name, string energies, string rateRows, string tables)
    {
        File.WriteAllText(folder.File($"{name}.csv"), "from,to,rate\n" + rateRows);
        var deck = folder.File($"{name}.toml");
        File.WriteAllText(deck, $"""
            format = 1
            title = "{name}"
            [temperature]
            kT = 1
            [states]
            coordinates = [1, 2, 3]
            labels = ["a", "b", "c"]
            [energies]
            values = {energies}
            [transfer]
            kind = "full"
            csv = "{name}.csv"
            {tables}
            """);
        return deck;
    }
}
