namespace StandFit.Core.Fitting.Expressions;

/// <summary>
/// The symbolic derivative of an expression tree with respect to one variable (a stimulus input),
/// by the rules of calculus for each operation. The result is itself a tree over the same
/// variables and parameters, so compiling it gives the slope of the curve and, by the compiled
/// program's forward-mode differentiation, the exact gradient of the slope with respect to the
/// parameters (the mixed second derivatives the delta method needs for a sensitivity). Subtrees that
/// do not depend on the variable differentiate to 0 and are dropped, so the result stays short.
/// </summary>
internal static class ExpressionDifferentiator
{
    public static ExpressionNode Differentiate(ExpressionNode node, int variable)
    {
        if (!DependsOn(node, variable))
        {
            return Zero(node.Column);
        }

        var c = node.Column;
        switch (node.Operation)
        {
            case Operation.Variable:
                return One(c);
            case Operation.Add:
            case Operation.Subtract:
                {
                    var da = DependsOn(node.Left!, variable) ? Differentiate(node.Left!, variable) : null;
                    var db = DependsOn(node.Right!, variable) ? Differentiate(node.Right!, variable) : null;
                    if (db is null)
                    {
                        return da!;
                    }

                    if (da is null)
                    {
                        return node.Operation == Operation.Add ? db : ExpressionNode.Unary(Operation.Negate, db, c);
                    }

                    return ExpressionNode.Binary(node.Operation, da, db, c);
                }

            case Operation.Multiply:
                {
                    // (a b)' = a' b + a b'
                    var a = node.Left!;
                    var b = node.Right!;
                    var left = DependsOn(a, variable) ? Product(Differentiate(a, variable), b, c) : null;
                    var right = DependsOn(b, variable) ? Product(a, Differentiate(b, variable), c) : null;
                    return Sum(left, right, c);
                }

            case Operation.Divide:
                {
                    // (a / b)' = a' / b - a b' / b^2
                    var a = node.Left!;
                    var b = node.Right!;
                    var left = DependsOn(a, variable) ? ExpressionNode.Binary(Operation.Divide, Differentiate(a, variable), b, c) : null;
                    ExpressionNode? right = null;
                    if (DependsOn(b, variable))
                    {
                        var square = ExpressionNode.Binary(Operation.Power, b, Constant(2, c), c);
                        right = ExpressionNode.Binary(Operation.Divide, Product(a, Differentiate(b, variable), c), square, c);
                    }

                    return left is null ? ExpressionNode.Unary(Operation.Negate, right!, c) : right is null ? left : ExpressionNode.Binary(Operation.Subtract, left, right, c);
                }

            case Operation.Power:
                {
                    var a = node.Left!;
                    var b = node.Right!;
                    ExpressionNode? left = null;
                    ExpressionNode? right = null;
                    if (DependsOn(a, variable))
                    {
                        // b a^(b-1) a'
                        var lower = b.IsConstant
                            ? Constant(DoubleDoubleMath.Subtract(b.Precise, DoubleDoubleMath.One), c)
                            : ExpressionNode.Binary(Operation.Subtract, b, One(c), c);
                        var power = ExpressionNode.Binary(Operation.Power, a, lower, c);
                        left = Product(Product(b, power, c), Differentiate(a, variable), c);
                    }

                    if (DependsOn(b, variable))
                    {
                        // a^b ln(a) b'
                        right = Product(Product(node, ExpressionNode.Unary(Operation.Ln, a, c), c), Differentiate(b, variable), c);
                    }

                    return Sum(left, right, c);
                }

            case Operation.Negate:
                return ExpressionNode.Unary(Operation.Negate, Differentiate(node.Left!, variable), c);
            default:
                return Product(Outer(node), Differentiate(node.Left!, variable), c);
        }
    }

    /// <summary>f'(a) for a function node f(a), as a tree in a.</summary>
    private static ExpressionNode Outer(ExpressionNode node)
    {
        var a = node.Left!;
        var c = node.Column;
        return node.Operation switch
        {
            Operation.Exp => node,
            Operation.Ln => ExpressionNode.Binary(Operation.Divide, One(c), a, c),
            Operation.Log10 => ExpressionNode.Binary(Operation.Divide, One(c), ExpressionNode.Binary(Operation.Multiply, a, Constant(DoubleDoubleMath.Apply(Operation.Ln, DoubleDoubleMath.Of(10.0), default), c), c), c),
            Operation.Sqrt => ExpressionNode.Binary(Operation.Divide, Constant(0.5, c), node, c),
            Operation.Sin => ExpressionNode.Unary(Operation.Cos, a, c),
            Operation.Cos => ExpressionNode.Unary(Operation.Negate, ExpressionNode.Unary(Operation.Sin, a, c), c),
            Operation.Tan => ExpressionNode.Binary(Operation.Add, One(c), ExpressionNode.Binary(Operation.Power, node, Constant(2, c), c), c),
            Operation.Atan => ExpressionNode.Binary(Operation.Divide, One(c), ExpressionNode.Binary(Operation.Add, One(c), ExpressionNode.Binary(Operation.Power, a, Constant(2, c), c), c), c),
            _ => throw new InvalidOperationException("No derivative rule for " + node.Operation),
        };
    }

    /// <summary>True when the subtree's value changes with the variable.</summary>
    internal static bool DependsOn(ExpressionNode node, int variable) => node.Operation switch
    {
        Operation.Variable => node.Index == variable,
        Operation.Constant or Operation.Parameter => false,
        _ => DependsOn(node.Left!, variable) || (node.Right is not null && DependsOn(node.Right, variable)),
    };

    /// <summary>a b, leaving out a factor that is the constant 1.</summary>
    private static ExpressionNode Product(ExpressionNode a, ExpressionNode b, int column)
    {
        if (IsOne(a))
        {
            return b;
        }

        return IsOne(b) ? a : ExpressionNode.Binary(Operation.Multiply, a, b, column);
    }

    private static ExpressionNode Sum(ExpressionNode? a, ExpressionNode? b, int column) =>
        a is null ? b! : b is null ? a : ExpressionNode.Binary(Operation.Add, a, b, column);

    private static bool IsOne(ExpressionNode node) => node.IsConstant && node.Precise.Hi == 1.0 && node.Precise.Lo == 0.0;

    private static ExpressionNode One(int column) => Constant(1.0, column);

    private static ExpressionNode Zero(int column) => Constant(0.0, column);

    private static ExpressionNode Constant(double value, int column) => ExpressionNode.Constant(value, column);

    private static ExpressionNode Constant(DoubleDouble value, int column) => ExpressionNode.Constant(value, column);
}
