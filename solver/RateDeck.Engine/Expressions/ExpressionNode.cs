namespace RateDeck.Expressions;

/// <summary>
/// The parsed expression. Nodes are built through the <c>Make</c> factories, which fold a node
/// whose operands are all constants into a <see cref="NumberNode"/>; folding never reorders
/// operations (x*2*3 stays (x*2)*3), so results are bit-for-bit those of the unfolded tree.
/// <see cref="Offset"/> is the position of the node's first character in the expression text.
/// </summary>
internal abstract record ExpressionNode(int Offset)
{
    /// <summary>
    /// The node as a delegate that reads variables from the values array: a tree of closures, one
    /// per node, each doing its node's one IEEE operation. No code is generated at run time, so the
    /// native-compiled program evaluates at the same speed and to the same bits as any other build.
    /// </summary>
    public abstract Func<double[], double> Closure();

    /// <summary>Nodes on the longest path from this one to a leaf (1 for a leaf): building and evaluating recurse this deep.</summary>
    public virtual int Depth => 1;
}

/// <summary>A number literal, a named constant or a folded constant subtree.</summary>
internal sealed record NumberNode(double Value, int Offset) : ExpressionNode(Offset)
{
    /// <inheritdoc />
    public override Func<double[], double> Closure()
    {
        var value = Value;
        return _ => value;
    }
}

/// <summary>A variable, read from slot <see cref="Index"/> of the values array.</summary>
internal sealed record VariableNode(string Name, int Index, int Offset) : ExpressionNode(Offset)
{
    /// <inheritdoc />
    public override Func<double[], double> Closure()
    {
        var index = Index;
        return values => values[index];
    }
}

/// <summary>Unary minus.</summary>
internal sealed record NegateNode(ExpressionNode Operand, int Offset) : ExpressionNode(Offset)
{
    /// <summary>-operand, folded when the operand is constant.</summary>
    public static ExpressionNode Make(ExpressionNode operand, int offset)
        => operand is NumberNode number ? new NumberNode(-number.Value, offset) : new NegateNode(operand, offset);

    /// <inheritdoc />
    public override int Depth { get; } = Operand.Depth + 1;

    /// <inheritdoc />
    public override Func<double[], double> Closure()
    {
        var operand = Operand.Closure();
        return values => -operand(values);
    }
}

/// <summary>The binary operators, by the character that writes them.</summary>
internal enum BinaryOperator
{
    Add = '+',
    Subtract = '-',
    Multiply = '*',
    Divide = '/',
    Power = '^',
}

/// <summary>A binary operation; the offset is that of the left operand.</summary>
internal sealed record BinaryNode(BinaryOperator Operator, ExpressionNode Left, ExpressionNode Right, int Offset)
    : ExpressionNode(Offset)
{
    /// <summary>left op right, folded when both operands are constant.</summary>
    public static ExpressionNode Make(BinaryOperator op, ExpressionNode left, ExpressionNode right)
        => left is NumberNode a && right is NumberNode b
            ? new NumberNode(Apply(op, a.Value, b.Value), left.Offset)
            : new BinaryNode(op, left, right, left.Offset);

    /// <inheritdoc />
    public override int Depth { get; } = Math.Max(Left.Depth, Right.Depth) + 1;

    /// <inheritdoc />
    public override Func<double[], double> Closure()
    {
        var left = Left.Closure();
        if (Operator == BinaryOperator.Power)
        {
            return PowerClosure(left, Right);
        }
        var right = Right.Closure();
        return Operator switch
        {
            BinaryOperator.Add => values => left(values) + right(values),
            BinaryOperator.Subtract => values => left(values) - right(values),
            BinaryOperator.Multiply => values => left(values) * right(values),
            _ => values => left(values) / right(values),
        };
    }

    private static double Apply(BinaryOperator op, double a, double b) => op switch
    {
        BinaryOperator.Add => a + b,
        BinaryOperator.Subtract => a - b,
        BinaryOperator.Multiply => a * b,
        BinaryOperator.Divide => a / b,
        _ => b switch
        {
            2 => a * a,
            3 => a * a * a,
            -1 => 1 / a,
            _ => Math.Pow(a, b),
        },
    };

    /// <summary>
    /// a^b. The exponents 2, 3 and -1, common in kernels, become a*a, (a*a)*a and 1/a (as in
    /// <see cref="Apply"/>) at a fraction of the cost of Math.Pow. They stay within one ulp of
    /// Math.Pow (a*a and 1/a are correctly rounded, so where they differ it is Math.Pow that is
    /// off; (a*a)*a rounds twice), and edge values agree (signed zeros, infinities, NaN).
    /// Any other exponent, or one not known at compile time, calls Math.Pow.
    /// </summary>
    private static Func<double[], double> PowerClosure(Func<double[], double> basis, ExpressionNode exponent)
    {
        switch (exponent)
        {
            case NumberNode { Value: 2 }:
                return values =>
                {
                    var a = basis(values);
                    return a * a;
                };
            case NumberNode { Value: 3 }:
                return values =>
                {
                    var a = basis(values);
                    return a * a * a;
                };
            case NumberNode { Value: -1 }:
                return values => 1 / basis(values);
            default:
                var power = exponent.Closure();
                return values => Math.Pow(basis(values), power(values));
        }
    }
}

/// <summary>A function call; the offset is that of the function name.</summary>
internal sealed record CallNode(DeckFunction Function, IReadOnlyList<ExpressionNode> Arguments, int Offset)
    : ExpressionNode(Offset)
{
    /// <summary>The call, folded when every argument is constant.</summary>
    public static ExpressionNode Make(DeckFunction function, IReadOnlyList<ExpressionNode> arguments, int offset)
        => arguments.All(a => a is NumberNode)
            ? new NumberNode(function.Apply(arguments.Select(a => ((NumberNode)a).Value).ToArray()), offset)
            : new CallNode(function, arguments, offset);

    /// <inheritdoc />
    public override int Depth { get; } = Arguments.Max(a => a.Depth) + 1;

    /// <inheritdoc />
    public override Func<double[], double> Closure() => Function.Closure([.. Arguments.Select(a => a.Closure())]);
}
