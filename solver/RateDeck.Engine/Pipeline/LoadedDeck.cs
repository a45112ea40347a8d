using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Mechanics;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Pipeline;

/// <summary>A deck taken through the first stages: validated, its states evaluated, its rate matrix assembled.</summary>
/// <param name="Deck">The validated deck.</param>
/// <param name="States">The evaluated state space.</param>
/// <param name="Rates">The assembled generator.</param>
/// <param name="Algebra">The linear-algebra provider the later stages use.</param>
public sealed record LoadedDeck(Deck Deck, StateSpace States, RateMatrix Rates, ILinearAlgebra Algebra)
{
    /// <summary>
    /// What the mechanics stage derived from the deck's Lagrangian at the state energies (actions,
    /// periods, weights, turning points), in state order; null when the deck has no Lagrangian.
    /// </summary>
    public MechanicsResult? Mechanics => States.Mechanics;

    /// <summary>
    /// This deck with <paramref name="overrides"/> applied after the ones it has, validated and
    /// assembled again without reading any file; see <see cref="Deck.With(IEnumerable{DeckOverride})"/>
    /// and <see cref="DeckPipeline.Assemble"/> for what is reused.
    /// </summary>
    /// <exception cref="DeckException">An override is invalid, or the deck it makes is.</exception>
    public LoadedDeck With(params IEnumerable<DeckOverride> overrides) => DeckPipeline.Assemble(Deck.With(overrides), Algebra);
}
