using RateDeck.Decks;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Pipeline;

/// <summary>
/// Which run-time inputs (kT and the deck parameters) each stage of a deck reads, from its compiled
/// expressions: a fit can tell which of its free values touch which stage (a parameter read by
/// nothing has no effect, and only a value the Lagrangian reads re-derives the mechanics).
/// kT is also read wherever detailed balance completes a rate or pi is formed, so it is listed
/// here only where an expression names it.
/// </summary>
public static class StageInputs
{
    /// <summary>
    /// For each deck expression, the inputs it names, in the scope's order (kT first, then the
    /// parameters by name): keys "energies", "weights", "mechanics", "transfer", "losses",
    /// "pumping" and "initial", present when the deck gives that item as an expression.
    /// </summary>
    /// <exception cref="DeckException">An expression does not compile (at the expression).</exception>
    public static IReadOnlyDictionary<string, IReadOnlyList<string>> ReadBy(Deck deck)
    {
        ArgumentNullException.ThrowIfNull(deck);
        var result = new Dictionary<string, IReadOnlyList<string>>(StringComparer.Ordinal);
        void Add(string stage, string text, SourceSpan origin, params string[] variables)
        {
            var scope = ExpressionScope.Create(deck, variables);
            result[stage] = scope.InputsRead(scope.Compile(text, origin));
        }

        void AddPerState(string stage, PerStateSource? source)
        {
            if (source is PerStateExpression expression)
            {
                Add(stage, expression.Text, expression.Span, PerStateEvaluator.StateVariables);
            }
        }

        AddPerState("energies", deck.Energies);
        AddPerState("weights", (deck.Weights as GivenWeights)?.Source);
        if (deck.Mechanics is { } mechanics)
        {
            Add("mechanics", mechanics.Lagrangian, mechanics.Span, StateSpaceBuilder.LagrangianVariables);
        }

        if (deck.Coupling is KernelModel kernel)
        {
            Add("transfer", kernel.Text, kernel.Span, RateMatrixAssembler.KernelVariables);
        }

        AddPerState("losses", deck.Losses);
        AddPerState("pumping", deck.Pumping);
        AddPerState("initial", (deck.Initial as InitialGiven)?.Source);
        return result;
    }
}
