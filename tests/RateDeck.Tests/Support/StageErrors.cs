using RateDeck.Decks;
using RateDeck.Tests.Decks;
using Xunit;

namespace RateDeck.Tests.Support;

/// <summary>Errors found after reading: a deck that parses but fails in a later stage, at a marked place.</summary>
internal static class StageErrors
{
    /// <summary>
    /// Reads <paramref name="markedDeck"/> (one <see cref="DeckScratch.Marker"/> where the error
    /// belongs), runs <paramref name="stage"/> on it and returns the <see cref="DeckException"/> it
    /// must throw at the marker's line and column.
    /// </summary>
    public static DeckException FailAt(DeckScratch scratch, string markedDeck, Action<Deck> stage)
    {
        var (text, line, column) = DeckScratch.Unmark(markedDeck);
        var deck = scratch.Parse(text);
        var error = Assert.Throws<DeckException>(() => stage(deck));
        DeckScratch.AssertAt(error, scratch.DeckPath, line, column);
        return error;
    }
}
