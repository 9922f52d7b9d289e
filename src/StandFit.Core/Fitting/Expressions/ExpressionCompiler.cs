using System.Collections.Immutable;
using StandFit.Core.Problems;

namespace StandFit.Core.Fitting.Expressions;

/// <summary>Which operands of an instruction depend on the parameters (carry a gradient).</summary>
[Flags]
internal enum Activity : byte
{
    None = 0,

    /// <summary>The first (or only) operand.</summary>
    Left = 1,

    /// <summary>The second operand.</summary>
    Right = 2,
}

/// <summary>
/// One instruction of the postfix program: pop the operands, push the result. <see cref="Index"/> is
/// the variable or parameter index, or the integer exponent of <see cref="Operation.PowerInteger"/>;
/// <see cref="Precise"/> the pushed constant or the exponent of <see cref="Operation.PowerConstant"/>
/// as a double-double, <see cref="Constant"/> the same rounded to a double.
/// </summary>
internal readonly record struct Instruction(Operation Operation, Activity Activity, int Index, DoubleDouble Precise)
{
    public double Constant => Precise.Hi;
}

/// <summary>
/// Turns a parsed tree into a postfix program: constant subtrees (those naming neither a variable
/// nor a parameter, such as <c>2*pi/12</c>) are folded to one number (in double-double, so the
/// precise evaluator keeps their digits), powers with a constant
/// exponent get their own instructions (an integer exponent is exact for negative bases and needs
/// no logarithm in its derivative), and every instruction records which of its operands depend on
/// the parameters, so the evaluator does no gradient work for the rest.
/// </summary>
internal static class ExpressionCompiler
{
    /// <summary>Integer exponents up to this size use <see cref="Operation.PowerInteger"/>.</summary>
    private const int LargestIntegerExponent = 1024;

    public static ExpressionParseResult Compile(string text, ExpressionNode root, ImmutableArray<string> variables, ImmutableArray<string> parameters)
    {
        ExpressionError? error = null;
        var folded = Fold(root, ref error);
        if (error is not null)
        {
            return ExpressionParseResult.Failure(error);
        }

        var program = new List<Instruction>();
        var depth = 0;
        var maxDepth = 0;
        Emit(folded, program, ref depth, ref maxDepth);
        return ExpressionParseResult.Success(new ModelExpression(text, variables, parameters, [.. program], maxDepth, folded));
    }

    /// <summary>
    /// Compiles a derivative tree made by <see cref="ExpressionDifferentiator"/>. A constant part
    /// without a finite value is kept as it is (its NaN or infinity shows in the slope's value, never
    /// as an error): the expression itself was valid.
    /// </summary>
    internal static ModelExpression CompileDerivative(string text, ExpressionNode root, ImmutableArray<string> variables, ImmutableArray<string> parameters)
    {
        ExpressionError? ignored = null;
        var folded = Fold(root, ref ignored);
        var program = new List<Instruction>();
        var depth = 0;
        var maxDepth = 0;
        Emit(folded, program, ref depth, ref maxDepth);
        return new ModelExpression(text, variables, parameters, [.. program], maxDepth, folded);
    }

    /// <summary>The value of one operation on plain numbers (the folding of constants uses the evaluator's own arithmetic).</summary>
    internal static double Apply(Operation operation, double a, double b) => operation switch
    {
        Operation.Add => a + b,
        Operation.Subtract => a - b,
        Operation.Multiply => a * b,
        Operation.Divide => a / b,
        Operation.Power => Math.Pow(a, b),
        Operation.Negate => -a,
        Operation.Exp => Math.Exp(a),
        Operation.Ln => Math.Log(a),
        Operation.Log10 => Math.Log10(a),
        Operation.Sqrt => Math.Sqrt(a),
        Operation.Sin => Math.Sin(a),
        Operation.Cos => Math.Cos(a),
        Operation.Tan => Math.Tan(a),
        Operation.Atan => Math.Atan(a),
        _ => throw new ArgumentOutOfRangeException(nameof(operation), operation, "Not an arithmetic operation."),
    };

    private static ExpressionNode Fold(ExpressionNode node, ref ExpressionError? error)
    {
        if (node.Left is null)
        {
            return node;
        }

        var left = Fold(node.Left, ref error);
        var right = node.Right is null ? null : Fold(node.Right, ref error);
        if (left.IsConstant && (right is null || right.IsConstant))
        {
            var value = DoubleDoubleMath.Apply(node.Operation, left.Precise, right?.Precise ?? default);
            if (!double.IsFinite(value.Hi))
            {
                error ??= new ExpressionError(Messages.ExpressionConstantNotFinite(), node.Column);
            }

            return ExpressionNode.Constant(value, node.Column);
        }

        if (ReferenceEquals(left, node.Left) && ReferenceEquals(right, node.Right))
        {
            return node;
        }

        return right is null
            ? ExpressionNode.Unary(node.Operation, left, node.Column)
            : ExpressionNode.Binary(node.Operation, left, right, node.Column);
    }

    private static void Emit(ExpressionNode node, List<Instruction> program, ref int depth, ref int maxDepth)
    {
        switch (node.Operation)
        {
            case Operation.Constant:
                Push(program, new Instruction(Operation.Constant, Activity.None, -1, node.Precise), ref depth, ref maxDepth);
                return;
            case Operation.Variable:
            case Operation.Parameter:
                Push(program, new Instruction(node.Operation, Activity.None, node.Index, default), ref depth, ref maxDepth);
                return;
        }

        var left = node.Left!;
        var leftActivity = left.DependsOnParameters ? Activity.Left : Activity.None;
        if (node.Right is null)
        {
            Emit(left, program, ref depth, ref maxDepth);
            program.Add(new Instruction(node.Operation, leftActivity, -1, default));
            return;
        }

        var right = node.Right;
        if (node.Operation == Operation.Power && right.IsConstant)
        {
            Emit(left, program, ref depth, ref maxDepth);
            var exponent = right.Precise;
            program.Add(Math.Abs(exponent.Hi) <= LargestIntegerExponent && exponent.Hi == Math.Round(exponent.Hi) && exponent.Lo == 0
                ? new Instruction(Operation.PowerInteger, leftActivity, (int)exponent.Hi, exponent)
                : new Instruction(Operation.PowerConstant, leftActivity, -1, exponent));
            return;
        }

        Emit(left, program, ref depth, ref maxDepth);
        Emit(right, program, ref depth, ref maxDepth);
        var activity = leftActivity | (right.DependsOnParameters ? Activity.Right : Activity.None);
        program.Add(new Instruction(node.Operation, activity, -1, default));
        depth--;
    }

    private static void Push(List<Instruction> program, Instruction instruction, ref int depth, ref int maxDepth)
    {
        program.Add(instruction);
        depth++;
        maxDepth = Math.Max(maxDepth, depth);
    }
}
