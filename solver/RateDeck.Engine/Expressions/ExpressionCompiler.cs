using System.Collections.Frozen;
using RateDeck.Decks;

namespace RateDeck.Expressions;

/// <summary>
/// Parses and compiles deck expressions (the language is described in docs/expressions.md).
/// <c>Compile(text, origin, variables)</c> parses the text once and returns a compiled
/// expression whose <see cref="CompiledExpression.Evaluate"/> takes the variables' values in the
/// order of the variable names. The origin is the span of the first
/// character of the text, so a <see cref="DeckException"/> can point at the offending character.
/// </summary>
public static class ExpressionCompiler
{
    /// <summary>
    /// Compiles <paramref name="text"/>; throws <see cref="DeckException"/> with the exact position of a problem.
    /// Subtrees of literals and constants (2*pi, gamma(0.5)) are folded at compile time; every
    /// name is a variable read from the values array, so a deck compiles each expression once with
    /// kT and its parameters among the variables, and a new kT or parameter value needs no new
    /// compilation. The compiled delegate allocates nothing when evaluated. Arithmetic is IEEE
    /// double: log(0) is -infinity, sqrt(-1) is NaN, and checking results for finiteness is the
    /// caller's business.
    /// </summary>
    /// <param name="text">The expression as written in the deck.</param>
    /// <param name="origin">The deck position of the first character of <paramref name="text"/>.</param>
    /// <param name="variables">
    /// The names the expression may read, in the order their values will be passed. They must be
    /// distinct identifiers and must not be reserved (see <see cref="IsReservedName"/>); a caller
    /// taking names from a deck checks that first, so breaking this is a programming error.
    /// </param>
    /// <exception cref="ArgumentException">A variable name is not an identifier, repeated or reserved.</exception>
    public static CompiledExpression Compile(string text, SourceSpan origin, IReadOnlyList<string> variables)
    {
        CheckNames(variables);
        var source = new ExpressionSource(text, origin);
        var (tree, used) = Parser.Parse(source, variables);
        return new CompiledExpression(text, Array.AsReadOnly(variables.ToArray()), used.ToFrozenSet(StringComparer.Ordinal), tree.Closure());
    }

    /// <summary>
    /// Compiles the derivative of <paramref name="text"/> with respect to the variable
    /// <paramref name="withRespectTo"/> (one of <paramref name="variables"/>), symbolically
    /// (<see cref="ExpressionDerivative"/>); evaluated with the same values array as the expression.
    /// </summary>
    /// <exception cref="DeckException">The text does not parse.</exception>
    /// <exception cref="NotSupportedException">The variable reaches min, max or gamma, which have no derivative rule.</exception>
    public static CompiledExpression CompileDerivative(string text, SourceSpan origin, IReadOnlyList<string> variables, string withRespectTo)
    {
        CheckNames(variables);
        var index = variables.ToList().IndexOf(withRespectTo);
        ArgumentOutOfRangeException.ThrowIfNegative(index, nameof(withRespectTo));
        var (tree, used) = Parser.Parse(new ExpressionSource(text, origin), variables);
        var derivative = ExpressionDerivative.Of(tree, index);
        return new CompiledExpression($"d({text})/d{withRespectTo}", Array.AsReadOnly(variables.ToArray()), used.ToFrozenSet(StringComparer.Ordinal), derivative.Closure());
    }

    /// <summary>
    /// True for the names of the language's functions and constants (exp, sqrt, ..., pi, e),
    /// which cannot name a variable or a deck parameter.
    /// </summary>
    public static bool IsReservedName(string name)
        => DeckFunction.All.ContainsKey(name) || Parser.ConstantNames.Contains(name, StringComparer.Ordinal);

    /// <summary>True when <paramref name="name"/> is a valid variable name: [A-Za-z_][A-Za-z0-9_]*.</summary>
    public static bool IsIdentifier(string name)
        => name.Length > 0
            && (char.IsAsciiLetter(name[0]) || name[0] == '_')
            && name.All(c => char.IsAsciiLetterOrDigit(c) || c == '_');

    private static void CheckNames(IEnumerable<string> names)
    {
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var name in names)
        {
            if (!IsIdentifier(name))
            {
                throw new ArgumentException($"variable name '{name}' is not an identifier", "names");
            }
            if (IsReservedName(name))
            {
                throw new ArgumentException($"variable name '{name}' is reserved for a function or constant", "names");
            }
            if (!seen.Add(name))
            {
                throw new ArgumentException($"variable name '{name}' is given twice", "names");
            }
        }
    }
}

/// <summary>
/// A compiled expression. Evaluation is thread-safe (the delegate keeps no state) and allocates
/// nothing, so a caller filling an N x N kernel reuses one values array and calls
/// <see cref="Evaluate"/> in its loop.
/// </summary>
public sealed class CompiledExpression
{
    private readonly Func<double[], double> _evaluate;
    private readonly int _variableCount;

    internal CompiledExpression(string text, IReadOnlyList<string> variables, IReadOnlySet<string> usedVariables, Func<double[], double> evaluate)
    {
        Text = text;
        Variables = variables;
        _variableCount = variables.Count;
        UsedVariables = usedVariables;
        _evaluate = evaluate;
    }

    /// <summary>The source text.</summary>
    public string Text { get; }

    /// <summary>The variable names, in the order <see cref="Evaluate"/> takes their values.</summary>
    public IReadOnlyList<string> Variables { get; }

    /// <summary>
    /// The variables the expression actually reads (a kernel without x and y is the same for
    /// every pair of states, say). Empty when the expression is a constant.
    /// </summary>
    public IReadOnlySet<string> UsedVariables { get; }

    /// <summary>True when the expression reads no variable, so one evaluation serves every point.</summary>
    public bool IsConstant => UsedVariables.Count == 0;

    /// <summary>Evaluates with variable values in the order given at compile time.</summary>
    /// <exception cref="ArgumentException">The array does not hold one value per variable.</exception>
    public double Evaluate(double[] variables)
    {
        ArgumentNullException.ThrowIfNull(variables);
        if (variables.Length != _variableCount)
        {
            throw new ArgumentException($"expected {_variableCount} variable values, got {variables.Length}", nameof(variables));
        }
        return _evaluate(variables);
    }
}
