using RateDeck.Decks;

namespace RateDeck.Expressions;

/// <summary>
/// Parses and compiles deck expressions. Contract (implemented in the expression-language work):
/// <c>Compile(text, origin, variables)</c> parses the text once and returns a compiled
/// expression whose <see cref="CompiledExpression.Evaluate"/> takes the variables' values in the
/// order of the variable names. The origin is the span of the first
/// character of the text, so a <see cref="DeckException"/> can point at the offending character.
/// </summary>
public static class ExpressionCompiler
{
    /// <summary>Compiles <paramref name="text"/>; throws <see cref="DeckException"/> with the exact position of a problem.</summary>
    public static CompiledExpression Compile(string text, SourceSpan origin, IReadOnlyList<string> variables)
        => throw new NotImplementedException("expression language: see the model-deck issue");
}

/// <summary>A compiled expression.</summary>
public sealed class CompiledExpression
{
    private readonly Func<double[], double> _evaluate;

    internal CompiledExpression(string text, Func<double[], double> evaluate)
    {
        Text = text;
        _evaluate = evaluate;
    }

    /// <summary>The source text.</summary>
    public string Text { get; }

    /// <summary>Evaluates with variable values in the order given at compile time.</summary>
    public double Evaluate(double[] variables) => _evaluate(variables);
}
