namespace RateDeck.Expressions;

/// <summary>
/// Symbolic differentiation of a parsed expression with respect to one variable, by the chain rule
/// on the tree (<see cref="ExpressionCompiler.CompileDerivative"/>). Chosen over forward-mode dual
/// numbers because the derivative is then an ordinary tree: it is compiled once by the same
/// compiler into a delegate that allocates nothing, folds its constants, and is evaluated with the
/// same values array as the expression itself. A product or sum with a zero derivative is dropped
/// while building, so d/dz of z*exp(-(x - y)/alpha) is exp(-(x - y)/alpha) and no more.
/// min, max and gamma have no derivative rule here (min and max have none where the arguments are
/// equal; gamma would need the digamma function, which the language lacks): differentiating
/// through them throws <see cref="NotSupportedException"/> naming the function.
/// </summary>
internal static class ExpressionDerivative
{
    private static readonly NumberNode _zero = new(0, 0);
    private static readonly NumberNode _one = new(1, 0);

    /// <summary>d <paramref name="node"/> / d (variable at <paramref name="index"/>).</summary>
    /// <exception cref="NotSupportedException">The variable reaches a function without a derivative rule.</exception>
    public static ExpressionNode Of(ExpressionNode node, int index) => node switch
    {
        NumberNode => _zero,
        VariableNode variable => variable.Index == index ? _one : _zero,
        NegateNode negate => Negate(Of(negate.Operand, index)),
        BinaryNode binary => Binary(binary, index),
        CallNode call => Call(call, index),
        _ => throw new NotSupportedException($"no derivative rule for {node.GetType().Name}"),
    };

    private static ExpressionNode Binary(BinaryNode node, int index)
    {
        var (u, v) = (node.Left, node.Right);
        var (du, dv) = (Of(u, index), Of(v, index));
        return node.Operator switch
        {
            BinaryOperator.Add => Add(du, dv),
            BinaryOperator.Subtract => Add(du, Negate(dv)),
            BinaryOperator.Multiply => Add(Multiply(du, v), Multiply(u, dv)),
            // (u/v)' = u'/v - u v' / v^2
            BinaryOperator.Divide => Add(Divide(du, v), Negate(Divide(Multiply(u, dv), Multiply(v, v)))),
            _ => Power(u, v, du, dv),
        };
    }

    /// <summary>(u^v)' = v u^(v-1) u' + u^v ln(u) v'.</summary>
    private static ExpressionNode Power(ExpressionNode u, ExpressionNode v, ExpressionNode du, ExpressionNode dv)
    {
        var constantExponent = Multiply(Multiply(v, BinaryNode.Make(BinaryOperator.Power, u, BinaryNode.Make(BinaryOperator.Subtract, v, _one))), du);
        return IsZero(dv)
            ? constantExponent
            : Add(constantExponent, Multiply(Multiply(BinaryNode.Make(BinaryOperator.Power, u, v), Call("log", u)), dv));
    }

    private static ExpressionNode Call(CallNode node, int index)
    {
        var arguments = node.Arguments;
        var derivatives = arguments.Select(a => Of(a, index)).ToArray();
        if (derivatives.All(IsZero))
        {
            return _zero;
        }

        var u = arguments[0];
        var du = derivatives[0];
        return node.Function.Name switch
        {
            "exp" => Multiply(node, du),
            "log" => Divide(du, u),
            "log10" => Divide(du, Multiply(u, new NumberNode(Math.Log(10), 0))),
            "sqrt" => Divide(du, Multiply(new NumberNode(2, 0), node)),
            "abs" => Multiply(Divide(u, node), du),
            "sin" => Multiply(Call("cos", u), du),
            "cos" => Negate(Multiply(Call("sin", u), du)),
            "tan" => Divide(du, Multiply(Call("cos", u), Call("cos", u))),
            "sinh" => Multiply(Call("cosh", u), du),
            "cosh" => Multiply(Call("sinh", u), du),
            "tanh" => Multiply(BinaryNode.Make(BinaryOperator.Subtract, _one, Multiply(node, node)), du),
            "atan" => Divide(du, Add(_one, Multiply(u, u))),
            "erf" => Multiply(Multiply(new NumberNode(2 / Math.Sqrt(Math.PI), 0), Call("exp", Negate(Multiply(u, u)))), du),
            // atan2(y, x)' = (x y' - y x') / (x^2 + y^2)
            "atan2" => Divide(Add(Multiply(arguments[1], du), Negate(Multiply(u, derivatives[1]))), Add(Multiply(arguments[1], arguments[1]), Multiply(u, u))),
            "pow" => Power(u, arguments[1], du, derivatives[1]),
            var name => throw new NotSupportedException($"`{name}` has no derivative rule"),
        };
    }

    private static ExpressionNode Call(string name, ExpressionNode argument) => CallNode.Make(DeckFunction.All[name], [argument], argument.Offset);

    private static bool IsZero(ExpressionNode node) => node is NumberNode { Value: 0 };

    private static bool IsOne(ExpressionNode node) => node is NumberNode { Value: 1 };

    private static ExpressionNode Add(ExpressionNode a, ExpressionNode b) =>
        IsZero(a) ? b : IsZero(b) ? a : BinaryNode.Make(BinaryOperator.Add, a, b);

    private static ExpressionNode Multiply(ExpressionNode a, ExpressionNode b) =>
        IsZero(a) || IsZero(b) ? _zero : IsOne(a) ? b : IsOne(b) ? a : BinaryNode.Make(BinaryOperator.Multiply, a, b);

    private static ExpressionNode Divide(ExpressionNode a, ExpressionNode b) =>
        IsZero(a) ? _zero : IsOne(b) ? a : BinaryNode.Make(BinaryOperator.Divide, a, b);

    private static ExpressionNode Negate(ExpressionNode a) => IsZero(a) ? _zero : NegateNode.Make(a, a.Offset);
}
