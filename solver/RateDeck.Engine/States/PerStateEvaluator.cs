using System.Globalization;
using RateDeck.Decks;

namespace RateDeck.States;

/// <summary>
/// Turns a <see cref="PerStateSource"/> into one value per state. An expression sees <c>x</c> (the
/// state's coordinate), <c>i</c> (the ONE-based state number, as a deck user counts), <c>kT</c>
/// and the deck parameters, run-time inputs of an expression compiled once per deck file.
/// </summary>
public static class PerStateEvaluator
{
    /// <summary>The built-in variables of a per-state expression: x, i and kT.</summary>
    public static IReadOnlyList<string> BuiltInVariables { get; } = ["x", "i", ExpressionScope.TemperatureName];

    /// <summary>The variables of a per-state expression before the inputs kT and the parameters.</summary>
    internal static readonly string[] StateVariables = ["x", "i"];

    /// <summary>
    /// Evaluates <paramref name="source"/> for every state of <paramref name="deck"/>'s grid and
    /// checks each value against <paramref name="requirement"/>. Throws <see cref="DeckException"/>
    /// at the source's span, naming the state and <paramref name="quantity"/> (e.g. "weight"),
    /// when a value fails or when explicit values do not match the number of states.
    /// </summary>
    public static double[] Evaluate(Deck deck, PerStateSource source, string quantity, PerStateRequirement requirement)
    {
        var grid = deck.Grid;
        var values = source switch
        {
            PerStateValues given => CheckCount(given, grid, quantity),
            PerStateExpression expression => EvaluateExpression(deck, expression),
            _ => throw new NotSupportedException($"unknown per-state source {source.GetType().Name}"),
        };

        for (var state = 0; state < values.Length; state++)
        {
            if (!Meets(values[state], requirement))
            {
                throw new DeckException(
                    source.Span,
                    string.Create(
                        CultureInfo.InvariantCulture,
                        $"the {quantity} of state '{grid.Labels[state]}' (state {state + 1}) is {values[state]}; it must be {Describe(requirement)}"));
            }
        }

        return values;
    }

    private static double[] CheckCount(PerStateValues given, GridSpec grid, string quantity)
    {
        if (given.Values.Length != grid.Count)
        {
            throw new DeckException(
                given.Span,
                $"{given.Values.Length} {quantity} values are given but the grid has {grid.Count} states; give one value per state");
        }

        return (double[])given.Values.Clone();
    }

    /// <summary>
    /// d(source)/d(<paramref name="input"/>) per state, <paramref name="input"/> being kT or a
    /// parameter: null when the source gives values or its expression does not read the input.
    /// </summary>
    /// <exception cref="NotSupportedException">The input reaches a function without a derivative rule.</exception>
    internal static double[]? Derivative(Deck deck, PerStateSource source, string input)
    {
        if (source is not PerStateExpression expression)
        {
            return null;
        }

        var scope = ExpressionScope.Create(deck, StateVariables);
        return scope.InputsRead(scope.Compile(expression.Text, expression.Span)).Contains(input)
            ? EvaluateEach(deck, scope, scope.CompileDerivative(expression.Text, expression.Span, input))
            : null;
    }

    private static double[] EvaluateExpression(Deck deck, PerStateExpression expression)
    {
        var scope = ExpressionScope.Create(deck, StateVariables);
        return EvaluateEach(deck, scope, scope.Compile(expression.Text, expression.Span));
    }

    private static double[] EvaluateEach(Deck deck, ExpressionScope scope, Expressions.CompiledExpression compiled)
    {
        var buffer = scope.NewValues();
        var values = new double[deck.Grid.Count];
        for (var state = 0; state < values.Length; state++)
        {
            buffer[0] = deck.Grid.Coordinates[state];
            buffer[1] = state + 1;
            values[state] = compiled.Evaluate(buffer);
        }

        return values;
    }

    private static bool Meets(double value, PerStateRequirement requirement) => requirement switch
    {
        PerStateRequirement.Finite => double.IsFinite(value),
        PerStateRequirement.NonNegative => double.IsFinite(value) && value >= 0,
        _ => double.IsFinite(value) && value > 0,
    };

    private static string Describe(PerStateRequirement requirement) => requirement switch
    {
        PerStateRequirement.Finite => "a finite number",
        PerStateRequirement.NonNegative => "finite and zero or more",
        _ => "finite and more than zero",
    };
}
