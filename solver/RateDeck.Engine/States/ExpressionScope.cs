using RateDeck.Decks;
using RateDeck.Expressions;

namespace RateDeck.States;

/// <summary>
/// The variables one kind of deck expression sees, in a fixed order: the built-in variables of that
/// kind first, as listed by the caller, then the deck parameters in ordinal order of their names.
/// The caller fills the built-in slots of a value buffer; the parameter slots are filled here once.
/// </summary>
internal sealed class ExpressionScope
{
    private readonly double[] _parameterValues;

    private ExpressionScope(string[] names, double[] parameterValues, int builtInCount)
    {
        Names = names;
        _parameterValues = parameterValues;
        BuiltInCount = builtInCount;
    }

    /// <summary>All variable names in evaluation order.</summary>
    public IReadOnlyList<string> Names { get; }

    /// <summary>Number of built-in variables at the front of <see cref="Names"/>.</summary>
    public int BuiltInCount { get; }

    /// <summary>
    /// The scope of built-in variables <paramref name="builtIns"/> plus the deck's parameters.
    /// A parameter named like a built-in is rejected at the parameter's span: it would be ambiguous.
    /// </summary>
    public static ExpressionScope Create(Deck deck, params string[] builtIns)
    {
        var parameters = deck.Parameters.Values.OrderBy(p => p.Name, StringComparer.Ordinal).ToArray();
        foreach (var parameter in parameters)
        {
            if (builtIns.Contains(parameter.Name, StringComparer.Ordinal))
            {
                throw new DeckException(
                    parameter.Span,
                    $"parameter '{parameter.Name}' has the name of a built-in variable ({string.Join(", ", builtIns)}); rename the parameter");
            }
        }

        var names = builtIns.Concat(parameters.Select(p => p.Name)).ToArray();
        return new ExpressionScope(names, parameters.Select(p => p.Value).ToArray(), builtIns.Length);
    }

    /// <summary>Compiles <paramref name="text"/> in this scope; errors point into the deck from <paramref name="origin"/>.</summary>
    public CompiledExpression Compile(string text, SourceSpan origin) => ExpressionCompiler.Compile(text, origin, Names);

    /// <summary>A fresh value buffer with the parameter slots filled and the built-in slots zero.</summary>
    public double[] NewValues()
    {
        var values = new double[Names.Count];
        _parameterValues.CopyTo(values, BuiltInCount);
        return values;
    }
}
