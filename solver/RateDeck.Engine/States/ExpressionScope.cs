using RateDeck.Decks;
using RateDeck.Expressions;

namespace RateDeck.States;

/// <summary>
/// What one kind of deck expression sees: its own variables (x and i for a per-state expression,
/// say), whose values the caller passes in the order listed, and the fixed names kT and the deck
/// parameters, bound at compile time. Bound names are folded like literals, so the parts of an
/// expression that depend only on them are computed once, not once per state or pair; the order
/// of operations is unchanged, so the values are the same as if they were passed.
/// </summary>
internal sealed class ExpressionScope
{
    /// <summary>The name of the temperature, bound in every scope.</summary>
    public const string TemperatureName = "kT";

    private readonly Dictionary<string, double> _bound;

    private ExpressionScope(string[] variables, Dictionary<string, double> bound)
    {
        Variables = variables;
        _bound = bound;
    }

    /// <summary>The variables in evaluation order (kT and the parameters are not among them).</summary>
    public IReadOnlyList<string> Variables { get; }

    /// <summary>
    /// The scope of <paramref name="variables"/> with kT and the deck's parameters bound. A
    /// parameter named like a variable or kT is rejected at the parameter's span: it would be ambiguous.
    /// </summary>
    public static ExpressionScope Create(Deck deck, params string[] variables)
    {
        var bound = new Dictionary<string, double>(StringComparer.Ordinal) { [TemperatureName] = deck.KT };
        foreach (var parameter in deck.Parameters.Values.OrderBy(p => p.Name, StringComparer.Ordinal))
        {
            if (variables.Contains(parameter.Name, StringComparer.Ordinal) || parameter.Name == TemperatureName)
            {
                throw new DeckException(
                    parameter.Span,
                    $"parameter '{parameter.Name}' has the name of a built-in variable ({string.Join(", ", variables.Append(TemperatureName))}); rename the parameter");
            }

            bound.Add(parameter.Name, parameter.Value);
        }

        return new ExpressionScope(variables, bound);
    }

    /// <summary>Compiles <paramref name="text"/> in this scope; errors point into the deck from <paramref name="origin"/>.</summary>
    public CompiledExpression Compile(string text, SourceSpan origin) => ExpressionCompiler.Compile(text, origin, Variables, _bound);

    /// <summary>A fresh value buffer, one slot per variable.</summary>
    public double[] NewValues() => new double[Variables.Count];
}
