using System.Text.RegularExpressions;
using RateDeck.Decks;
using RateDeck.Expressions;
using RateDeck.Fitting.Setup;

namespace RateDeck.Fitting.Model;

/// <summary>
/// What a data column is compared with: a state's population (a column named by a state label),
/// or an observable, an expression of populations written P(label), kT and the deck parameters
/// (<c>scale * P(B)</c>, <c>P(k1) + P(k2)</c>). The expression is compiled once; kT and the
/// parameters are passed at every evaluation, so a trial never recompiles it.
/// </summary>
public sealed partial class Observable
{
    private readonly CompiledExpression? _expression;
    private readonly int[] _states;
    private readonly string[] _parameters;
    private readonly double[] _buffer;
    private readonly SourceSpan _span;
    private readonly Dictionary<string, CompiledExpression> _derivatives = new(StringComparer.Ordinal);

    private Observable(string name, CompiledExpression? expression, int[] states, string[] parameters, SourceSpan span)
    {
        Name = name;
        _expression = expression;
        _states = states;
        _parameters = parameters;
        _span = span;
        _buffer = new double[states.Length + 1 + parameters.Length];
    }

    /// <summary>The column name.</summary>
    public string Name { get; }

    /// <summary>The population of one state.</summary>
    public static Observable Population(string label, int state) => new(label, null, [state], [], SourceSpan.None(label));

    /// <summary>The states whose populations the observable reads, in slot order.</summary>
    public IReadOnlyList<int> States => _states;

    /// <summary>
    /// Compiles an observable of <paramref name="deck"/>. P(label) is replaced by a variable name padded
    /// to the same length, so an error in the expression still points at the right column.
    /// </summary>
    /// <exception cref="DeckException">A label is unknown or the expression is malformed.</exception>
    public static Observable Compile(ObservableSpec spec, Deck deck)
    {
        var states = new List<int>();
        var text = PopulationCall().Replace(spec.Expression, match =>
        {
            var label = match.Groups[1].Value;
            var state = Array.IndexOf(deck.Grid.Labels, label);
            if (state < 0)
            {
                throw new DeckException(spec.Span.Shift(match.Groups[1].Index), $"the deck has no state `{label}`.{Text.Suggestions.Hint(label, deck.Grid.Labels)}");
            }

            var slot = states.IndexOf(state);
            if (slot < 0)
            {
                slot = states.Count;
                states.Add(state);
            }

            return SlotName(slot).PadRight(match.Length);
        });
        var parameters = deck.Parameters.Keys.Order(StringComparer.Ordinal).ToArray();
        var variables = states.Select((_, k) => SlotName(k)).Append("kT").Concat(parameters).ToArray();
        var compiled = ExpressionCompiler.Compile(text, spec.Span, variables);
        return new Observable(spec.Name, compiled, [.. states], parameters, spec.Span);
    }

    /// <summary>The observable at one time from the populations there.</summary>
    public double Evaluate(double[] populations, Deck deck) => _expression is null ? populations[_states[0]] : _expression.Evaluate(Fill(populations, deck));

    /// <summary>d(observable)/dP of each state in <see cref="States"/>, at these populations.</summary>
    /// <exception cref="NotSupportedException">The expression reads a population through a function without a derivative rule.</exception>
    public double[] PopulationGradient(double[] populations, Deck deck)
    {
        if (_expression is null)
        {
            return [1.0];
        }

        var values = Fill(populations, deck);
        return [.. _states.Select((_, k) => Derivative(SlotName(k)).Evaluate(values))];
    }

    /// <summary>d(observable)/d(<paramref name="input"/>) with the populations held (kT or a parameter the expression names; 0 otherwise).</summary>
    /// <exception cref="NotSupportedException">The input reaches a function without a derivative rule.</exception>
    public double InputDerivative(double[] populations, Deck deck, string input) =>
        _expression is null || !_expression.UsedVariables.Contains(input) ? 0 : Derivative(input).Evaluate(Fill(populations, deck));

    private CompiledExpression Derivative(string variable)
    {
        if (!_derivatives.TryGetValue(variable, out var derivative))
        {
            derivative = ExpressionCompiler.CompileDerivative(_expression!.Text, _span, _expression.Variables, variable);
            _derivatives[variable] = derivative;
        }

        return derivative;
    }

    private double[] Fill(double[] populations, Deck deck)
    {
        for (var k = 0; k < _states.Length; k++)
        {
            _buffer[k] = populations[_states[k]];
        }

        _buffer[_states.Length] = deck.KT;
        for (var k = 0; k < _parameters.Length; k++)
        {
            _buffer[_states.Length + 1 + k] = deck.Parameters[_parameters[k]].Value;
        }

        return _buffer;
    }

    /// <summary>
    /// The variable standing for the k-th population read: four characters (as short as the
    /// shortest call, P(B)), padded with spaces to the call's length in the text.
    /// </summary>
    private static string SlotName(int slot) => $"_{slot}".PadRight(4, '_');

    [GeneratedRegex(@"(?<![A-Za-z0-9_])P\(\s*([^()\s,]+)\s*\)")]
    private static partial Regex PopulationCall();
}
