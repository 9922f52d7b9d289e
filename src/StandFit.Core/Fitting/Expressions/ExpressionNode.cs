namespace StandFit.Core.Fitting.Expressions;

/// <summary>
/// A node of the parsed expression tree. <see cref="Operation.Constant"/> holds
/// <see cref="Value"/> (as a double-double: <see cref="Precise"/>); <see cref="Operation.Variable"/> and <see cref="Operation.Parameter"/> hold
/// <see cref="Index"/>; unary operations (negation and functions) hold <see cref="Left"/>; binary
/// ones hold <see cref="Left"/> and <see cref="Right"/>. <see cref="Column"/> is where the node
/// starts in the text (1-based), for messages.
/// </summary>
internal sealed class ExpressionNode
{
    private ExpressionNode(Operation operation, int column, DoubleDouble value, int index, ExpressionNode? left, ExpressionNode? right)
    {
        Operation = operation;
        Column = column;
        Precise = value;
        Index = index;
        Left = left;
        Right = right;
        DependsOnParameters = operation == Operation.Parameter
            || (left?.DependsOnParameters ?? false)
            || (right?.DependsOnParameters ?? false);
        IsConstant = operation == Operation.Constant;
    }

    public Operation Operation { get; }

    public int Column { get; }

    /// <summary>The constant's value, rounded to a double.</summary>
    public double Value => Precise.Hi;

    /// <summary>The constant's value as a double-double (folded constants keep about 32 digits).</summary>
    public DoubleDouble Precise { get; }

    public int Index { get; }

    public ExpressionNode? Left { get; }

    public ExpressionNode? Right { get; }

    /// <summary>True when the node's value changes with some parameter: its gradient is not identically zero.</summary>
    public bool DependsOnParameters { get; }

    public bool IsConstant { get; }

    public static ExpressionNode Constant(DoubleDouble value, int column) => new(Operation.Constant, column, value, -1, null, null);

    public static ExpressionNode Constant(double value, int column) => Constant(new DoubleDouble(value, 0.0), column);

    public static ExpressionNode Variable(int index, int column) => new(Operation.Variable, column, default, index, null, null);

    public static ExpressionNode Parameter(int index, int column) => new(Operation.Parameter, column, default, index, null, null);

    public static ExpressionNode Unary(Operation operation, ExpressionNode operand, int column) => new(operation, column, default, -1, operand, null);

    public static ExpressionNode Binary(Operation operation, ExpressionNode left, ExpressionNode right, int column) => new(operation, column, default, -1, left, right);
}
