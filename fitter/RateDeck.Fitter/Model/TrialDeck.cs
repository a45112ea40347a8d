using RateDeck.Decks;

namespace RateDeck.Fitting.Model;

/// <summary>
/// The free values of one trial, collected as the engine's typed overrides and applied to the data
/// set's deck in one <see cref="Deck.With(IEnumerable{DeckOverride})"/>: kT and [parameters] entries
/// as numbers, per-state losses, pumping and initial populations as one <c>values</c> array per
/// table (several free states of one table share it). The deck is validated as a deck file saying
/// so would be, and the engine reuses compiled expressions, rate files and the mechanics. A measured
/// rate has no deck key (it is a row of the rate CSV), so those are set on the validated deck's table.
/// </summary>
public sealed class TrialDeck
{
    private readonly Deck _deck;
    private readonly List<DeckOverride> _overrides = [];
    private readonly Dictionary<string, double[]> _perState = new(StringComparer.Ordinal);
    private RateEntry[]? _measured;

    /// <summary>Starts from <paramref name="deck"/>, the data set's deck before the free values.</summary>
    public TrialDeck(Deck deck) => _deck = deck;

    /// <summary>The data set's deck before the free values.</summary>
    public Deck Base => _deck;

    /// <summary>Adds a typed override (kT, a parameter).</summary>
    public void Add(DeckOverride change) => _overrides.Add(change);

    /// <summary>The per-state values of <paramref name="table"/> (losses, pumping, initial) for this trial, read from the deck on first use.</summary>
    public double[] PerState(string table, Func<Deck, double[]> read) =>
        _perState.TryGetValue(table, out var values) ? values : _perState[table] = (double[])read(_deck).Clone();

    /// <summary>The measured one-way rates for this trial, copied from the deck on first use.</summary>
    public RateEntry[] Measured(MeasuredOneWay oneWay) => _measured ??= [.. oneWay.Entries];

    /// <summary>The deck with every value of the trial.</summary>
    /// <exception cref="DeckException">A value makes the deck invalid.</exception>
    public Deck Build()
    {
        var overrides = _overrides.Concat(_perState.Select(table => DeckOverride.Set(table.Key + ".values", table.Value))).ToList();
        var deck = overrides.Count == 0 ? _deck : _deck.With(overrides);
        return _measured is null ? deck : deck with { Coupling = (MeasuredOneWay)deck.Coupling with { Entries = _measured } };
    }
}
