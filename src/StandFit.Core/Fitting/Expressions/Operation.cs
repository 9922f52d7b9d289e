namespace StandFit.Core.Fitting.Expressions;

/// <summary>The operations of the expression tree and of the compiled program.</summary>
internal enum Operation : byte
{
    /// <summary>Push a constant.</summary>
    Constant,

    /// <summary>Push a variable (stimulus) value.</summary>
    Variable,

    /// <summary>Push a parameter value (with the unit vector as its gradient).</summary>
    Parameter,

    Add,
    Subtract,
    Multiply,
    Divide,

    /// <summary>a^b, both operands computed.</summary>
    Power,

    /// <summary>a^n for an integer constant n (held in the instruction).</summary>
    PowerInteger,

    /// <summary>a^c for a non-integer constant c (held in the instruction).</summary>
    PowerConstant,

    Negate,
    Exp,
    Ln,
    Log10,
    Sqrt,
    Sin,
    Cos,
    Tan,
    Atan,
}
