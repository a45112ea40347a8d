using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Pipeline;

/// <summary>
/// The stages every verb and the fitter share, in order: deck text -> validated deck -> state
/// space -> rate matrix. Later stages (diagnostics, propagators, outputs) take the result.
/// </summary>
/// <remarks>
/// For many trials of one deck (a fit, a sweep) read it once and derive each trial with
/// <see cref="LoadedDeck.With"/> or <see cref="Deck.With(IEnumerable{DeckOverride})"/>: the
/// overrides are typed and validated like the deck, the TOML is not parsed again, rate files are
/// not read again, expressions are not compiled again (kT and parameters are run-time inputs), and
/// the mechanics of a Lagrangian is derived again only when a value it reads, h or an energy changed.
/// </remarks>
public static class DeckPipeline
{
    /// <summary>Reads, validates and assembles the deck at <paramref name="path"/>; throws <see cref="DeckException"/> on bad input.</summary>
    public static LoadedDeck Load(string path, IReadOnlyList<string> overrides, ILinearAlgebra algebra) =>
        Assemble(DeckReader.Read(path, overrides), algebra);

    /// <summary>
    /// Evaluates and assembles an already validated deck (the fitter calls this for each trial).
    /// A deck with a Lagrangian goes through the mechanics stage, whose full result is kept in
    /// <see cref="LoadedDeck.Mechanics"/>.
    /// </summary>
    public static LoadedDeck Assemble(Deck deck, ILinearAlgebra algebra)
    {
        var states = StateSpaceBuilder.Build(deck);
        var rates = RateMatrixAssembler.Assemble(deck, states);
        // P(0) is part of the deck: every verb refuses a bad one, not only those that propagate.
        var initial = RunSetup.InitialPopulations(deck, states);
        if (!initial.Any(p => p > 0) && !rates.Pumping.Any(s => s > 0))
        {
            throw new DeckException(deck.Initial.Span, "every initial population is 0 and nothing is pumped in, so every population stays 0; give a state, or populations above 0");
        }

        return new LoadedDeck(deck, states, rates, algebra);
    }
}
