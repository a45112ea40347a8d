using RateDeck.Decks;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary>
/// A scratch folder for deck tests. Deck and CSV texts may hold one marker <c>§</c> at the place
/// where an error must be reported; the marker is removed before the text is read and its line
/// and column (one-based) are what the test asserts.
/// </summary>
internal sealed class DeckScratch : IDisposable
{
    public const char Marker = '§';

    public const string Rates = "from,to,rate\nb,a,1.0\nc,b,2.0\nc,a,0.5\n";

    public DeckScratch()
    {
        Directory = Path.Combine(Path.GetTempPath(), "ratedeck-decks-" + Guid.NewGuid().ToString("N"));
        System.IO.Directory.CreateDirectory(Directory);
        Write("rates.csv", Rates);
    }

    public string Directory { get; }

    public string DeckPath => Path.Combine(Directory, "deck.toml");

    public string Write(string name, string text)
    {
        var path = Path.Combine(Directory, name);
        File.WriteAllText(path, text);
        return path;
    }

    /// <summary>A valid three-state deck; each table's body may be replaced, and text appended.</summary>
    public static string Valid(
        string units = "energy = \"eV\"",
        string temperature = "kT = 0.5",
        string states = "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"a\", \"b\", \"c\"]",
        string energies = "values = [0.0, 1.0, 2.0]",
        string weights = "values = [1, 3, 5]",
        string transfer = "kind = \"one_way\"\ndirection = \"toward_smaller\"\ncsv = \"rates.csv\"",
        string run = "t_end = 1.0",
        string extra = "",
        string top = "format = 1\ntitle = \"test deck\"")
        => $"{top}\n[units]\n{units}\n[temperature]\n{temperature}\n[states]\n{states}\n[energies]\n{energies}\n[weights]\n{weights}\n[transfer]\n{transfer}\n[run]\n{run}\n{extra}\n";

    public Deck Parse(string text, params string[] overrides)
        => DeckReader.Parse(text, DeckPath, Directory, overrides);

    /// <summary>Reads a deck that must fail at the marker in its text; returns the error.</summary>
    public DeckException FailAt(string markedDeck, params string[] overrides)
    {
        var (text, line, column) = Unmark(markedDeck);
        var error = Assert.Throws<DeckException>(() => Parse(text, overrides));
        AssertAt(error, DeckPath, line, column);
        return error;
    }

    /// <summary>Reads the valid deck with <paramref name="markedCsv"/> as rates.csv; it must fail at the marker in the CSV.</summary>
    public DeckException CsvFailAt(string markedCsv, string? deck = null)
    {
        var (text, line, column) = Unmark(markedCsv);
        var csvPath = Write("rates.csv", text);
        var error = Assert.Throws<DeckException>(() => Parse(deck ?? Valid()));
        AssertAt(error, csvPath, line, column);
        return error;
    }

    /// <summary>The text without its marker, and the marker's one-based line and column.</summary>
    public static (string Text, int Line, int Column) Unmark(string marked)
    {
        var (text, places) = UnmarkAll(marked);
        Assert.True(places.Count == 1, "the test text must hold exactly one marker");
        return (text, places[0].Line, places[0].Column);
    }

    /// <summary>The text without markers, and each marker's one-based line and column in that text.</summary>
    public static (string Text, List<(int Line, int Column)> Places) UnmarkAll(string marked)
    {
        var places = new List<(int, int)>();
        var text = new System.Text.StringBuilder();
        var (line, column) = (1, 1);
        foreach (var c in marked)
        {
            if (c == Marker)
            {
                places.Add((line, column));
                continue;
            }

            text.Append(c);
            (line, column) = c == '\n' ? (line + 1, 1) : (line, column + 1);
        }

        return (text.ToString(), places);
    }

    public static void AssertAt(DeckException error, string file, int line, int column)
    {
        Assert.Equal(file, error.Span.File);
        Assert.True(line == error.Span.Line && column == error.Span.Column,
            $"expected the error at {line}:{column}, got {error.Span.Line}:{error.Span.Column}: {error.Message}");
    }

    public void Dispose()
    {
        try
        {
            System.IO.Directory.Delete(Directory, recursive: true);
        }
        catch (IOException)
        {
            // A leftover temp folder is harmless.
        }
    }
}
