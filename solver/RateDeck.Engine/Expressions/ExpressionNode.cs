using System.Linq.Expressions;

namespace RateDeck.Expressions;

/// <summary>
/// The parsed expression. Nodes are built through the <c>Make</c> factories, which fold a node
/// whose operands are all constants into a <see cref="NumberNode"/>; folding never reorders
/// operations (x*2*3 stays (x*2)*3), so results are bit-for-bit those of the unfolded tree.
/// <see cref="Offset"/> is the position of the node's first character in the expression text.
/// </summary>
internal abstract record ExpressionNode(int Offset)
{
    /// <summary>The node as a System.Linq.Expressions tree reading variables from <paramref name="values"/>.</summary>
    public abstract Expression Emit(ParameterExpression values);

    /// <summary>Nodes on the longest path from this one to a leaf (1 for a leaf): emitting and compiling recurse this deep.</summary>
    public virtual int Depth => 1;
}

/// <summary>A number literal, a named constant or a folded constant subtree.</summary>
internal sealed record NumberNode(double Value, int Offset) : ExpressionNode(Offset)
{
    /// <inheritdoc />
    public override Expression Emit(ParameterExpression values) => Expression.Constant(Value);
}

/// <summary>A variable, read from slot <see cref="Index"/> of the values array.</summary>
internal sealed record VariableNode(string Name, int Index, int Offset) : ExpressionNode(Offset)
{
    /// <inheritdoc />
    public override Expression Emit(ParameterExpression values)
        => Expression.ArrayIndex(values, Expression.Constant(Index));
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
    public override Expression Emit(ParameterExpression values) => Expression.Negate(Operand.Emit(values));
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
    public override Expression Emit(ParameterExpression values)
    {
        var left = Left.Emit(values);
        if (Operator == BinaryOperator.Power)
        {
            return EmitPower(left, Right, values);
        }
        var right = Right.Emit(values);
        return Operator switch
        {
            BinaryOperator.Add => Expression.Add(left, right),
            BinaryOperator.Subtract => Expression.Subtract(left, right),
            BinaryOperator.Multiply => Expression.Multiply(left, right),
            _ => Expression.Divide(left, right),
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
    private static Expression EmitPower(Expression basis, ExpressionNode exponent, ParameterExpression values)
    {
        if (exponent is NumberNode { Value: 2 or 3 or -1 } number)
        {
            var a = Expression.Variable(typeof(double), "basis");
            var power = number.Value switch
            {
                2 => Expression.Multiply(a, a),
                3 => Expression.Multiply(Expression.Multiply(a, a), a),
                _ => (Expression)Expression.Divide(Expression.Constant(1.0), a),
            };
            return Expression.Block(typeof(double), [a], Expression.Assign(a, basis), power);
        }
        return Expression.Call(typeof(Math).GetMethod(nameof(Math.Pow))!, basis, exponent.Emit(values));
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
    public override Expression Emit(ParameterExpression values)
        => Function.Emit(Arguments.Select(a => a.Emit(values)).ToArray());
}
