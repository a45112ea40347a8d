using RateDeck.Decks;

namespace RateDeck.Outputs;

/// <summary>
/// Provenance written at the top of every CSV file: which program made it, from which deck (path
/// and SHA-256 of its bytes) and with which <c>--set</c> overrides. A script can compare the hash
/// to tell whether a result still belongs to the deck in version control.
/// </summary>
/// <param name="ToolVersion">The program version, normally <see cref="ToolInfo.Version"/>.</param>
/// <param name="DeckPath">The deck file as given on the command line.</param>
/// <param name="DeckSha256">Lower-case hex SHA-256 of the deck file's bytes.</param>
/// <param name="Overrides">The overrides as given, in order.</param>
public sealed record OutputHeader(string ToolVersion, string DeckPath, string DeckSha256, IReadOnlyList<string> Overrides)
{
    /// <summary>The comment character that starts every header line.</summary>
    public const char CommentChar = '#';

    /// <summary>The header for results of <paramref name="deck"/> made by this program.</summary>
    public static OutputHeader For(Deck deck)
    {
        ArgumentNullException.ThrowIfNull(deck);
        return new OutputHeader(ToolInfo.Version, deck.SourcePath, deck.Sha256, deck.Overrides);
    }

    /// <summary>
    /// The four header lines, without line ends:
    /// <c># ratedeck VERSION</c>, <c># deck: PATH</c>, <c># deck_sha256: HEX</c> and
    /// <c># overrides: none</c> or <c># overrides: ["key=value", ...]</c>. The overrides are a JSON
    /// array of strings so that any character in them (commas, quotes, line breaks) stays unambiguous.
    /// </summary>
    public IEnumerable<string> Lines()
    {
        yield return $"{CommentChar} {ToolInfo.Name} {OneLine(ToolVersion)}";
        yield return $"{CommentChar} deck: {OneLine(DeckPath)}";
        yield return $"{CommentChar} deck_sha256: {OneLine(DeckSha256)}";
        yield return $"{CommentChar} overrides: {(Overrides.Count == 0 ? "none" : JsonSummary.SerializeValue(Overrides))}";
    }

    /// <summary>
    /// Writes <see cref="Lines"/>, then one <c># key: value</c> line per entry of
    /// <paramref name="notes"/> (units and meanings specific to one file).
    /// </summary>
    internal void WriteTo(TextWriter writer, IEnumerable<KeyValuePair<string, string>> notes)
    {
        foreach (var line in Lines())
        {
            writer.WriteLine(line);
        }

        WriteNotes(writer, notes);
    }

    /// <summary>Writes one <c># key: value</c> line per entry of <paramref name="notes"/>, each on one line.</summary>
    internal static void WriteNotes(TextWriter writer, IEnumerable<KeyValuePair<string, string>> notes)
    {
        foreach (var (key, value) in notes)
        {
            writer.WriteLine($"{CommentChar} {key}: {OneLine(value)}");
        }
    }

    // A line break inside a value would end the comment and start a bogus data row.
    private static string OneLine(string text) => text.Replace("\r", "\\r", StringComparison.Ordinal).Replace("\n", "\\n", StringComparison.Ordinal);
}
