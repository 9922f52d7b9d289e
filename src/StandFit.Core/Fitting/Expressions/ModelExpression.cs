using System.Collections.Immutable;
using System.Runtime.CompilerServices;

namespace StandFit.Core.Fitting.Expressions;

/// <summary>
/// A compiled model expression: a postfix program over doubles that computes the model's value and,
/// by forward-mode automatic differentiation (each stack slot carries its value and its gradient
/// with respect to every parameter), the exact gradient. Immutable and safe to share between
/// threads; evaluation allocates nothing (the caller lends the scratch space). Made by
/// <see cref="ExpressionParser.Parse"/>.
/// </summary>
public sealed partial class ModelExpression
{
    private const int StackLimitOnStack = 256;

    private readonly Instruction[] _program;
    private readonly bool _rootIsActive;
    private readonly ExpressionNode? _tree;
    private readonly ModelExpression?[] _inputDerivatives;

    internal ModelExpression(string text, ImmutableArray<string> variableNames, ImmutableArray<string> parameterNames, Instruction[] program, int maxStack, ExpressionNode? tree = null)
    {
        _tree = tree;
        _inputDerivatives = new ModelExpression?[variableNames.Length];
        Text = text;
        VariableNames = variableNames;
        ParameterNames = parameterNames;
        _program = program;
        MaxStack = maxStack;

        // The last instruction computes the root; it carries a gradient when it pushes a parameter
        // or when any of its operands does.
        _rootIsActive = program[^1].Operation == Operation.Parameter || program[^1].Activity != Activity.None;
        GradientScratchLength = maxStack * (parameterNames.Length + 1);
    }

    /// <summary>The expression as written.</summary>
    public string Text { get; }

    /// <summary>The variables (stimulus columns), in the order <see cref="Evaluate"/> takes their values.</summary>
    public ImmutableArray<string> VariableNames { get; }

    /// <summary>The parameters, in the order of the parameter vector.</summary>
    public ImmutableArray<string> ParameterNames { get; }

    /// <summary>Number of parameters (1 to <see cref="ExpressionLanguage.MaxParameters"/>).</summary>
    public int ParameterCount => ParameterNames.Length;

    /// <summary>Number of variables (0 to <see cref="ExpressionLanguage.MaxVariables"/>).</summary>
    public int VariableCount => VariableNames.Length;

    /// <summary>The length of the scratch span <see cref="EvaluateWithGradient"/> needs.</summary>
    public int GradientScratchLength { get; }

    internal int MaxStack { get; }

    internal ReadOnlySpan<Instruction> Program => _program;

    /// <summary>Index of a parameter by name, or -1.</summary>
    public int IndexOf(string parameter) => ParameterNames.IndexOf(parameter);

    /// <summary>
    /// The partial derivative of the model with respect to variable <paramref name="variable"/>, as
    /// an expression over the same variables and parameters (built symbolically once, then kept):
    /// its value is the curve's slope, and its gradient the slope's exact gradient with respect to
    /// the parameters. Its values may be NaN or infinite where the model's are not (the slope of
    /// sqrt(x) at 0).
    /// </summary>
    public ModelExpression InputDerivative(int variable)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(variable);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(variable, VariableNames.Length);
        var cached = Volatile.Read(ref _inputDerivatives[variable]);
        if (cached is not null)
        {
            return cached;
        }

        var tree = _tree ?? throw new InvalidOperationException("This expression keeps no tree to differentiate.");
        var derivative = ExpressionCompiler.CompileDerivative("d(" + Text + ")/d" + VariableNames[variable], ExpressionDifferentiator.Differentiate(tree, variable), VariableNames, ParameterNames);
        return Interlocked.CompareExchange(ref _inputDerivatives[variable], derivative, null) ?? derivative;
    }

    /// <summary>
    /// The model's value for one point: <paramref name="parameters"/> in <see cref="ParameterNames"/>
    /// order, <paramref name="variables"/> in <see cref="VariableNames"/> order. Outside the domain
    /// of a function (ln of a negative number, a division by zero) the value is NaN or infinite,
    /// never an exception.
    /// </summary>
    public double Evaluate(ReadOnlySpan<double> parameters, ReadOnlySpan<double> variables)
    {
        CheckLengths(parameters, variables);
        Span<double> stack = MaxStack <= StackLimitOnStack ? stackalloc double[MaxStack] : new double[MaxStack];
        var top = -1;
        foreach (ref readonly var instruction in _program.AsSpan())
        {
            switch (instruction.Operation)
            {
                case Operation.Constant:
                    stack[++top] = instruction.Constant;
                    break;
                case Operation.Variable:
                    stack[++top] = variables[instruction.Index];
                    break;
                case Operation.Parameter:
                    stack[++top] = parameters[instruction.Index];
                    break;
                case Operation.PowerInteger:
                    stack[top] = IntegerPower(stack[top], instruction.Index);
                    break;
                case Operation.PowerConstant:
                    stack[top] = Math.Pow(stack[top], instruction.Constant);
                    break;
                case Operation.Add:
                case Operation.Subtract:
                case Operation.Multiply:
                case Operation.Divide:
                case Operation.Power:
                    top--;
                    stack[top] = ExpressionCompiler.Apply(instruction.Operation, stack[top], stack[top + 1]);
                    break;
                default:
                    stack[top] = ExpressionCompiler.Apply(instruction.Operation, stack[top], 0.0);
                    break;
            }
        }

        return stack[0];
    }

    /// <summary>
    /// The model's value for one point, and in <paramref name="gradient"/> (length
    /// <see cref="ParameterCount"/>) its exact partial derivative with respect to each parameter.
    /// <paramref name="scratch"/> must hold at least <see cref="GradientScratchLength"/> values; it
    /// is overwritten, and one span can serve every call of a fit.
    /// </summary>
    public double EvaluateWithGradient(ReadOnlySpan<double> parameters, ReadOnlySpan<double> variables, Span<double> gradient, Span<double> scratch)
    {
        CheckLengths(parameters, variables);
        var p = ParameterNames.Length;
        if (gradient.Length != p)
        {
            throw new ArgumentException("The gradient span needs one element per parameter.", nameof(gradient));
        }

        if (scratch.Length < GradientScratchLength)
        {
            throw new ArgumentException("The scratch span is shorter than GradientScratchLength.", nameof(scratch));
        }

        var stride = p + 1;
        var top = -1;
        foreach (ref readonly var instruction in _program.AsSpan())
        {
            var activity = instruction.Activity;
            switch (instruction.Operation)
            {
                case Operation.Constant:
                    scratch[++top * stride] = instruction.Constant;
                    continue;
                case Operation.Variable:
                    scratch[++top * stride] = variables[instruction.Index];
                    continue;
                case Operation.Parameter:
                    {
                        var slot = scratch.Slice(++top * stride, stride);
                        slot.Clear();
                        slot[0] = parameters[instruction.Index];
                        slot[1 + instruction.Index] = 1.0;
                        continue;
                    }
            }

            if (IsBinary(instruction.Operation))
            {
                var a = scratch.Slice((top - 1) * stride, stride);
                var b = scratch.Slice(top * stride, stride);
                top--;
                Binary(instruction.Operation, activity, a, b);
            }
            else
            {
                Unary(instruction, scratch.Slice(top * stride, stride));
            }
        }

        if (_rootIsActive)
        {
            scratch.Slice(1, p).CopyTo(gradient);
        }
        else
        {
            gradient.Clear();
        }

        return scratch[0];
    }

    /// <summary>
    /// The model's value for one point in double-double arithmetic (about 32 digits), for residuals
    /// of fits that are nearly exact. Same inputs as <see cref="Evaluate"/>.
    /// </summary>
    internal DoubleDouble EvaluatePrecise(ReadOnlySpan<double> parameters, ReadOnlySpan<double> variables)
    {
        CheckLengths(parameters, variables);
        Span<DoubleDouble> stack = MaxStack <= StackLimitOnStack ? stackalloc DoubleDouble[MaxStack] : new DoubleDouble[MaxStack];
        var top = -1;
        foreach (ref readonly var instruction in _program.AsSpan())
        {
            switch (instruction.Operation)
            {
                case Operation.Constant:
                    stack[++top] = instruction.Precise;
                    break;
                case Operation.Variable:
                    stack[++top] = DoubleDoubleMath.Of(variables[instruction.Index]);
                    break;
                case Operation.Parameter:
                    stack[++top] = DoubleDoubleMath.Of(parameters[instruction.Index]);
                    break;
                case Operation.PowerInteger:
                    stack[top] = DoubleDoubleMath.IntegerPower(stack[top], instruction.Index);
                    break;
                case Operation.PowerConstant:
                    stack[top] = DoubleDoubleMath.Power(stack[top], instruction.Precise);
                    break;
                case Operation.Add:
                case Operation.Subtract:
                case Operation.Multiply:
                case Operation.Divide:
                case Operation.Power:
                    top--;
                    stack[top] = DoubleDoubleMath.Apply(instruction.Operation, stack[top], stack[top + 1]);
                    break;
                default:
                    stack[top] = DoubleDoubleMath.Apply(instruction.Operation, stack[top], default);
                    break;
            }
        }

        return stack[0];
    }

    public override string ToString() => Text;

    private static bool IsBinary(Operation operation) =>
        operation is Operation.Add or Operation.Subtract or Operation.Multiply or Operation.Divide or Operation.Power;

    /// <summary>a := a op b on value and gradient; a and b are stack slots [value, gradient...].</summary>
    private static void Binary(Operation operation, Activity activity, Span<double> a, ReadOnlySpan<double> b)
    {
        var av = a[0];
        var bv = b[0];
        var left = (activity & Activity.Left) != 0;
        var right = (activity & Activity.Right) != 0;
        var ga = a[1..];
        var gb = b[1..];
        switch (operation)
        {
            case Operation.Add:
                a[0] = av + bv;
                if (right)
                {
                    if (left)
                    {
                        AddScaled(ga, 1.0, gb);
                    }
                    else
                    {
                        gb.CopyTo(ga);
                    }
                }

                break;
            case Operation.Subtract:
                a[0] = av - bv;
                if (right)
                {
                    if (left)
                    {
                        AddScaled(ga, -1.0, gb);
                    }
                    else
                    {
                        Scale(ga, gb, -1.0);
                    }
                }

                break;
            case Operation.Multiply:
                a[0] = av * bv;
                if (left && right)
                {
                    for (var j = 0; j < ga.Length; j++)
                    {
                        ga[j] = (ga[j] * bv) + (av * gb[j]);
                    }
                }
                else if (left)
                {
                    Scale(ga, ga, bv);
                }
                else if (right)
                {
                    Scale(ga, gb, av);
                }

                break;
            case Operation.Divide:
                {
                    var v = av / bv;
                    a[0] = v;
                    if (left && right)
                    {
                        for (var j = 0; j < ga.Length; j++)
                        {
                            ga[j] = (ga[j] - (v * gb[j])) / bv;
                        }
                    }
                    else if (left)
                    {
                        Scale(ga, ga, 1.0 / bv);
                    }
                    else if (right)
                    {
                        Scale(ga, gb, -v / bv);
                    }

                    break;
                }

            default:
                {
                    // a^b: d = b a^(b-1) da + a^b ln(a) db; the ln term only where b moves, and zero where a^b is 0.
                    var v = Math.Pow(av, bv);
                    a[0] = v;
                    var dA = left ? bv * Math.Pow(av, bv - 1.0) : 0.0;
                    var dB = right ? (v == 0.0 ? 0.0 : v * Math.Log(av)) : 0.0;
                    if (left && right)
                    {
                        for (var j = 0; j < ga.Length; j++)
                        {
                            ga[j] = (dA * ga[j]) + (dB * gb[j]);
                        }
                    }
                    else if (left)
                    {
                        Scale(ga, ga, dA);
                    }
                    else if (right)
                    {
                        Scale(ga, gb, dB);
                    }

                    break;
                }
        }
    }

    /// <summary>f(a) and f'(a) of a unary instruction: the one definition the per-point and batch evaluators share.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double UnaryValue(in Instruction instruction, double a, out double derivative)
    {
        double value;
        switch (instruction.Operation)
        {
            case Operation.Negate:
                value = -a;
                derivative = -1.0;
                break;
            case Operation.PowerInteger:
                value = IntegerPower(a, instruction.Index);
                derivative = instruction.Index switch
                {
                    0 => 0.0,
                    1 => 1.0,
                    2 => 2.0 * a,
                    -1 => -(value * value),
                    _ => instruction.Index * IntegerPower(a, instruction.Index - 1),
                };
                break;
            case Operation.PowerConstant:
                value = Math.Pow(a, instruction.Constant);
                derivative = instruction.Constant * Math.Pow(a, instruction.Constant - 1.0);
                break;
            case Operation.Exp:
                value = Math.Exp(a);
                derivative = value;
                break;
            case Operation.Ln:
                value = Math.Log(a);
                derivative = 1.0 / a;
                break;
            case Operation.Log10:
                value = Math.Log10(a);
                derivative = 1.0 / (a * Math.Log(10.0));
                break;
            case Operation.Sqrt:
                value = Math.Sqrt(a);
                derivative = 0.5 / value;
                break;
            case Operation.Sin:
                value = Math.Sin(a);
                derivative = Math.Cos(a);
                break;
            case Operation.Cos:
                value = Math.Cos(a);
                derivative = -Math.Sin(a);
                break;
            case Operation.Tan:
                value = Math.Tan(a);
                derivative = 1.0 + (value * value);
                break;
            case Operation.Atan:
                value = Math.Atan(a);
                derivative = 1.0 / (1.0 + (a * a));
                break;
            default:
                throw new InvalidOperationException("Not a unary operation: " + instruction.Operation);
        }

        return value;
    }

    /// <summary>slot := f(slot) on value and gradient (chain rule: the gradient times f').</summary>
    private static void Unary(in Instruction instruction, Span<double> slot)
    {
        var value = UnaryValue(instruction, slot[0], out var derivative);
        slot[0] = value;
        if ((instruction.Activity & Activity.Left) != 0)
        {
            var g = slot[1..];
            Scale(g, g, derivative);
        }
    }

    private static double IntegerPower(double a, int n) => n switch
    {
        1 => a,
        2 => a * a,
        -1 => 1.0 / a,
        _ => Math.Pow(a, n),
    };

    private static void Scale(Span<double> target, ReadOnlySpan<double> source, double factor)
    {
        for (var j = 0; j < target.Length; j++)
        {
            target[j] = source[j] * factor;
        }
    }

    private static void AddScaled(Span<double> target, double factor, ReadOnlySpan<double> source)
    {
        for (var j = 0; j < target.Length; j++)
        {
            target[j] += factor * source[j];
        }
    }

    private void CheckLengths(ReadOnlySpan<double> parameters, ReadOnlySpan<double> variables)
    {
        if (parameters.Length != ParameterNames.Length)
        {
            throw new ArgumentException("One value per parameter is needed.", nameof(parameters));
        }

        if (variables.Length != VariableNames.Length)
        {
            throw new ArgumentException("One value per variable is needed.", nameof(variables));
        }
    }
}
