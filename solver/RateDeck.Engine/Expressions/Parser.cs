using RateDeck.Decks;
using RateDeck.Text;

namespace RateDeck.Expressions;

/// <summary>
/// Recursive-descent parser of the expression language, loosest binding first:
/// <code>
/// sum     = product { ("+" | "-") product }
/// product = unary { ("*" | "/") unary }
/// unary   = ("-" | "+") unary | power
/// power   = primary [ "^" unary ]          (right associative: 2^3^2 = 2^9)
/// primary = number | name | name "(" [ sum { "," sum } ] ")" | "(" sum ")"
/// </code>
/// so that -2^2 = -(2^2) and 2^-1 = 0.5, as in ordinary mathematical notation.
/// Constant subtrees are folded as they are built (see <see cref="ExpressionNode"/>).
/// </summary>
internal sealed class Parser
{
    /// <summary>Deepest nesting of parentheses, signs and powers accepted, well inside the thread's stack.</summary>
    private const int _maxNesting = 256;

    /// <summary>
    /// Deepest tree accepted (a chain of 1000 terms a + b + ... is 1000 deep): compiling the tree
    /// recurses once per level, so this bound keeps it well inside even a small thread stack.
    /// </summary>
    private const int _maxDepth = 1000;

    private const string _operand = "a number, a name or '('";

    private static readonly Dictionary<string, double> _constants = new(StringComparer.Ordinal)
    {
        ["pi"] = Math.PI,
        ["e"] = Math.E,
    };

    private readonly ExpressionSource _source;
    private readonly Lexer _lexer;
    private readonly Dictionary<string, int> _variables;
    private readonly HashSet<string> _used = new(StringComparer.Ordinal);
    private Token _previous;
    private Token _current;
    private int _nesting;

    private Parser(ExpressionSource source, IReadOnlyList<string> variables)
    {
        _source = source;
        _lexer = new Lexer(source);
        _variables = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var k = 0; k < variables.Count; k++)
        {
            _variables.Add(variables[k], k);
        }
    }

    /// <summary>The names reserved for constants.</summary>
    public static IEnumerable<string> ConstantNames => _constants.Keys;

    /// <summary>Parses the whole text; returns the folded tree and the variables it reads.</summary>
    public static (ExpressionNode Tree, IReadOnlySet<string> UsedVariables) Parse(ExpressionSource source, IReadOnlyList<string> variables)
    {
        var parser = new Parser(source, variables);
        parser.Advance();
        if (parser._current.Kind == TokenKind.End)
        {
            throw source.Error(0, $"empty expression: expected {_operand}");
        }
        var tree = parser.ParseSum();
        if (parser._current.Kind != TokenKind.End)
        {
            throw parser.Leftover();
        }
        return (tree, parser._used);
    }

    private void Advance()
    {
        _previous = _current;
        _current = _lexer.Next();
    }

    private ExpressionNode ParseSum()
    {
        var left = ParseProduct();
        while (_current.Kind is TokenKind.Plus or TokenKind.Minus)
        {
            var op = _current.Kind == TokenKind.Plus ? BinaryOperator.Add : BinaryOperator.Subtract;
            var at = _current.Offset;
            Advance();
            left = Bounded(BinaryNode.Make(op, left, ParseProduct()), at);
        }
        return left;
    }

    private ExpressionNode ParseProduct()
    {
        var left = ParseUnary();
        while (_current.Kind is TokenKind.Star or TokenKind.Slash)
        {
            var op = _current.Kind == TokenKind.Star ? BinaryOperator.Multiply : BinaryOperator.Divide;
            var at = _current.Offset;
            Advance();
            left = Bounded(BinaryNode.Make(op, left, ParseUnary()), at);
        }
        return left;
    }

    private ExpressionNode ParseUnary()
    {
        if (++_nesting > _maxNesting)
        {
            throw _source.Error(_current.Offset, $"expression nested more than {_maxNesting} levels deep: simplify it");
        }
        ExpressionNode result;
        var sign = _current;
        if (sign.Kind is TokenKind.Minus or TokenKind.Plus)
        {
            Advance();
            var operand = ParseUnary();
            result = sign.Kind == TokenKind.Minus ? Bounded(NegateNode.Make(operand, sign.Offset), sign.Offset) : operand;
        }
        else
        {
            result = ParsePower();
        }
        _nesting--;
        return result;
    }

    /// <summary>The node, or a located error at the operator that makes the tree deeper than <see cref="_maxDepth"/>.</summary>
    private ExpressionNode Bounded(ExpressionNode node, int operatorOffset)
        => node.Depth <= _maxDepth
            ? node
            : throw _source.Error(operatorOffset, $"expression more than {_maxDepth} operations deep (a chain of terms counts one level each): split it, or simplify it");

    private ExpressionNode ParsePower()
    {
        var basis = ParsePrimary();
        if (_current.Kind != TokenKind.Caret)
        {
            return basis;
        }
        var at = _current.Offset;
        Advance();
        return Bounded(BinaryNode.Make(BinaryOperator.Power, basis, ParseUnary()), at);
    }

    private ExpressionNode ParsePrimary()
    {
        var token = _current;
        switch (token.Kind)
        {
            case TokenKind.Number:
                Advance();
                return new NumberNode(token.Value, token.Offset);
            case TokenKind.OpenParen:
                Advance();
                var inner = ParseSum();
                if (_current.Kind != TokenKind.CloseParen)
                {
                    throw Unexpected($"an operator or ')' to close '(' at {_source.Describe(token.Offset, _current.Offset)}");
                }
                Advance();
                return inner;
            case TokenKind.Name:
                Advance();
                return _current.Kind == TokenKind.OpenParen ? ParseCall(token) : ResolveName(token);
            default:
                throw Unexpected(_operand);
        }
    }

    private ExpressionNode ParseCall(Token name)
    {
        if (!DeckFunction.All.TryGetValue(name.Text, out var function))
        {
            throw _source.Error(name.Offset, DescribeUnknownFunction(name.Text));
        }
        var open = _current;
        Advance();
        var arguments = new List<ExpressionNode>();
        if (_current.Kind != TokenKind.CloseParen)
        {
            while (true)
            {
                arguments.Add(ParseSum());
                if (_current.Kind == TokenKind.CloseParen)
                {
                    break;
                }
                if (_current.Kind != TokenKind.Comma)
                {
                    throw Unexpected($"an operator, ',' or ')' to close the arguments of '{name.Text}' opened at {_source.Describe(open.Offset, _current.Offset)}");
                }
                Advance();
            }
        }
        Advance();
        if (arguments.Count < function.MinArguments || arguments.Count > function.MaxArguments)
        {
            throw _source.Error(name.Offset, $"'{name.Text}' {function.DescribeArity()}, got {arguments.Count}");
        }
        return Bounded(CallNode.Make(function, arguments, name.Offset), name.Offset);
    }

    private ExpressionNode ResolveName(Token name)
    {
        if (_variables.TryGetValue(name.Text, out var index))
        {
            _used.Add(name.Text);
            return new VariableNode(name.Text, index, name.Offset);
        }
        if (_constants.TryGetValue(name.Text, out var value))
        {
            return new NumberNode(value, name.Offset);
        }
        if (DeckFunction.All.ContainsKey(name.Text))
        {
            throw _source.Error(name.Offset, $"'{name.Text}' is a function: call it as {name.Text}(...)");
        }
        var suggestion = Suggestions.Closest(name.Text, VariableNames.Concat(_constants.Keys));
        var problem = suggestion is not null
            ? $"unknown name '{name.Text}': did you mean '{suggestion}'?"
            : $"unknown name '{name.Text}': not a variable here ({DescribeVariables()}), a constant (pi, e) or a function";
        throw _source.Error(name.Offset, problem);
    }

    private string DescribeUnknownFunction(string name)
    {
        if (VariableNames.Contains(name, StringComparer.Ordinal) || _constants.ContainsKey(name))
        {
            return $"'{name}' is a {(_constants.ContainsKey(name) ? "constant" : "variable")}, not a function: write '*' for a product";
        }
        var suggestion = Suggestions.Closest(name, DeckFunction.All.Keys);
        return suggestion is not null
            ? $"unknown function '{name}': did you mean '{suggestion}'?"
            : $"unknown function '{name}': the functions are {string.Join(", ", DeckFunction.All.Keys)}";
    }

    /// <summary>The names with values (a deck's parameters and kT among them).</summary>
    private IEnumerable<string> VariableNames => _variables.Keys;

    private string DescribeVariables() => VariableNames.Any() ? string.Join(", ", VariableNames) : "there are none";

    /// <summary>An error at a token left over after a complete expression.</summary>
    private DeckException Leftover() => _current.Kind switch
    {
        TokenKind.CloseParen => _source.Error(_current.Offset, "unexpected ')': there is no '(' to close"),
        TokenKind.Comma => _source.Error(_current.Offset, "unexpected ',' outside the arguments of a function call"),
        _ => Unexpected("an operator (+ - * / ^) or the end of the expression"),
    };

    /// <summary>An error at the current token, which is not what the grammar allows here.</summary>
    private DeckException Unexpected(string expected)
    {
        var found = _current.Kind == TokenKind.End ? "unexpected end of expression" : $"unexpected {_current.Describe()}";
        var hint = (_previous.Kind, _current.Kind) switch
        {
            (TokenKind.Star, TokenKind.Star) => "; write '^' for a power, not '**'",
            (_, TokenKind.Name or TokenKind.OpenParen) when expected != _operand => "; write '*' for a product",
            _ => "",
        };
        return _source.Error(_current.Offset, $"{found}: expected {expected}{hint}");
    }
}
