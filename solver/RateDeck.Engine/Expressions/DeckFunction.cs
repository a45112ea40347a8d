using MathNet.Numerics;

namespace RateDeck.Expressions;

/// <summary>
/// A function callable from a deck expression. Every function is a static method of one or two
/// doubles; a function of two arguments that accepts more (min, max) is applied left to right,
/// min(a, b, c) = min(min(a, b), c). Constant folding and evaluation call the same method, so
/// a folded subtree gives exactly the value evaluation would.
/// </summary>
internal sealed class DeckFunction
{
    private readonly Func<double, double>? _unary;
    private readonly Func<double, double, double>? _binary;

    private DeckFunction(string name, string parameters, int minArguments, int maxArguments, Delegate implementation)
    {
        Name = name;
        Parameters = parameters;
        MinArguments = minArguments;
        MaxArguments = maxArguments;
        _unary = implementation as Func<double, double>;
        _binary = implementation as Func<double, double, double>;
    }

    /// <summary>The name as written in a deck.</summary>
    public string Name { get; }

    /// <summary>The parameter names for messages, e.g. "y, x".</summary>
    public string Parameters { get; }

    /// <summary>The smallest number of arguments accepted.</summary>
    public int MinArguments { get; }

    /// <summary>The largest number of arguments accepted (<see cref="int.MaxValue"/> when unbounded).</summary>
    public int MaxArguments { get; }

    /// <summary>The functions of the language by name (ordinal, case-sensitive).</summary>
    public static IReadOnlyDictionary<string, DeckFunction> All { get; } = new[]
    {
        Unary("exp", Math.Exp),
        Unary("log", Math.Log),
        Unary("log10", Math.Log10),
        Unary("sqrt", Math.Sqrt),
        Unary("abs", Math.Abs),
        Unary("sin", Math.Sin),
        Unary("cos", Math.Cos),
        Unary("tan", Math.Tan),
        Unary("sinh", Math.Sinh),
        Unary("cosh", Math.Cosh),
        Unary("tanh", Math.Tanh),
        Unary("atan", Math.Atan),
        Unary("gamma", SpecialMath.Gamma),
        Unary("erf", SpecialFunctions.Erf),
        new DeckFunction("atan2", "y, x", 2, 2, (Func<double, double, double>)Math.Atan2),
        new DeckFunction("pow", "base, exponent", 2, 2, (Func<double, double, double>)Math.Pow),
        new DeckFunction("min", "a, b, ...", 2, int.MaxValue, (Func<double, double, double>)Math.Min),
        new DeckFunction("max", "a, b, ...", 2, int.MaxValue, (Func<double, double, double>)Math.Max),
    }.ToDictionary(f => f.Name, StringComparer.Ordinal);

    /// <summary>"takes 1 argument", "takes 2 arguments (y, x)", "takes 2 or more arguments (a, b, ...)".</summary>
    public string DescribeArity()
    {
        var count = MaxArguments == int.MaxValue ? $"{MinArguments} or more arguments"
            : MinArguments == 1 ? "1 argument"
            : $"{MinArguments} arguments";
        return MinArguments == 1 ? $"takes {count}" : $"takes {count} ({Parameters})";
    }

    /// <summary>Applies the function to constant arguments (constant folding).</summary>
    public double Apply(IReadOnlyList<double> arguments)
    {
        if (_unary is not null)
        {
            return _unary(arguments[0]);
        }
        var value = arguments[0];
        for (var k = 1; k < arguments.Count; k++)
        {
            value = _binary!(value, arguments[k]);
        }
        return value;
    }

    /// <summary>The call as a closure over its arguments' closures (see <see cref="ExpressionNode.Closure"/>).</summary>
    public Func<double[], double> Closure(IReadOnlyList<Func<double[], double>> arguments)
    {
        if (_unary is { } unary)
        {
            var argument = arguments[0];
            return values => unary(argument(values));
        }
        var binary = _binary!;
        var call = arguments[0];
        for (var k = 1; k < arguments.Count; k++)
        {
            var (left, right) = (call, arguments[k]);
            call = values => binary(left(values), right(values));
        }
        return call;
    }

    private static DeckFunction Unary(string name, Func<double, double> implementation)
        => new(name, "x", 1, 1, implementation);
}
