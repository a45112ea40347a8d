using RateDeck.Decks;
using RateDeck.Expressions;

namespace RateDeck.States;

/// <summary>
/// What one kind of deck expression sees: its own variables (x and i for a per-state expression,
/// say), then kT and the deck parameters as run-time inputs, all read from one values array in
/// that order. An expression is compiled once per deck file (the compiled form is kept in the
/// deck's memo and shared by every deck derived from it by overrides); a new kT or parameter
/// value only changes the array <see cref="NewValues"/> returns.
/// </summary>
internal sealed class ExpressionScope
{
    /// <summary>The name of the temperature, an input of every scope.</summary>
    public const string TemperatureName = "kT";

    private readonly Deck _deck;
    private readonly string[] _names;
    private readonly int _ownCount;

    private ExpressionScope(Deck deck, string[] names, int ownCount)
    {
        _deck = deck;
        _names = names;
        _ownCount = ownCount;
    }

    /// <summary>
    /// The scope of <paramref name="variables"/> with kT and the deck's parameters as inputs. A
    /// parameter named like a variable or kT is rejected at the parameter's span: it would be ambiguous.
    /// </summary>
    public static ExpressionScope Create(Deck deck, params string[] variables)
    {
        var parameters = deck.Parameters.Values.OrderBy(p => p.Name, StringComparer.Ordinal).ToArray();
        foreach (var parameter in parameters)
        {
            if (variables.Contains(parameter.Name, StringComparer.Ordinal) || parameter.Name == TemperatureName)
            {
                throw new DeckException(
                    parameter.Span,
                    $"parameter '{parameter.Name}' has the name of a built-in variable ({string.Join(", ", variables.Append(TemperatureName))}); rename the parameter");
            }
        }

        string[] names = [.. variables, TemperatureName, .. parameters.Select(p => p.Name)];
        return new ExpressionScope(deck, names, variables.Length);
    }

    /// <summary>
    /// Compiles <paramref name="text"/> in this scope, or takes the compiled form kept from an
    /// earlier deck of the same file; errors point into the deck from <paramref name="origin"/>.
    /// </summary>
    public CompiledExpression Compile(string text, SourceSpan origin)
        => _deck.Memo.GetOrAdd(
            new CompiledKey(text, origin, string.Join(',', _names)),
            () => ExpressionCompiler.Compile(text, origin, _names));

    /// <summary>
    /// Compiles d(<paramref name="text"/>)/d(<paramref name="input"/>) in this scope, or takes the
    /// compiled form kept from an earlier deck of the same file.
    /// </summary>
    /// <exception cref="NotSupportedException">The input reaches a function without a derivative rule.</exception>
    public CompiledExpression CompileDerivative(string text, SourceSpan origin, string input)
        => _deck.Memo.GetOrAdd(
            new DerivativeKey(text, origin, string.Join(',', _names), input),
            () => ExpressionCompiler.CompileDerivative(text, origin, _names, input));

    /// <summary>A value buffer: the own variables zero, then kT and the parameters of this deck.</summary>
    public double[] NewValues()
    {
        var values = new double[_names.Length];
        for (var k = _ownCount; k < values.Length; k++)
        {
            values[k] = InputValue(_names[k]);
        }

        return values;
    }

    /// <summary>The inputs (kT and parameters) that <paramref name="compiled"/> reads, in scope order.</summary>
    public IReadOnlyList<string> InputsRead(CompiledExpression compiled)
        => _names.Skip(_ownCount).Where(compiled.UsedVariables.Contains).ToArray();

    /// <summary>The values of <see cref="InputsRead"/> in this deck, in the same order.</summary>
    public double[] InputValues(CompiledExpression compiled) => InputsRead(compiled).Select(InputValue).ToArray();

    private double InputValue(string name) => name == TemperatureName ? _deck.KT : _deck.Parameters[name].Value;

    private sealed record CompiledKey(string Text, SourceSpan Origin, string Names);

    private sealed record DerivativeKey(string Text, SourceSpan Origin, string Names, string Input);
}
