using System.Collections.Concurrent;

namespace RateDeck.Decks;

/// <summary>
/// What the stages worked out from one deck file and may reuse for every deck derived from it by
/// overrides: compiled expressions, rate files already read, mechanics already derived. Each stage
/// keys its own entries by everything its result depends on, so a hit is always valid. Shared by
/// <see cref="Deck.With(IEnumerable{DeckOverride})"/> and safe for trials run in parallel.
/// </summary>
internal sealed class DeckMemo
{
    private readonly ConcurrentDictionary<object, object> _entries = new();

    /// <summary>The entry under <paramref name="key"/> (a value with structural equality), made by <paramref name="create"/> when absent.</summary>
    public T GetOrAdd<T>(object key, Func<T> create)
        where T : class
        => (T)_entries.GetOrAdd(key, _ => create());
}
