namespace StandFit.Core.Fitting.Expressions;

/// <summary>
/// Why an expression was refused: a message that says what is wrong and how to fix it, and the
/// 1-based column (character position) in the expression text where the problem is, or 0 when the
/// problem is with the expression as a whole or with the names it was given. The recipe binder
/// turns it into a recipe problem at the expression's place in the file.
/// </summary>
public sealed record ExpressionError(string Message, int Column);

/// <summary>Either a compiled <see cref="ModelExpression"/> or the <see cref="ExpressionError"/> that kept it from being made.</summary>
public sealed class ExpressionParseResult
{
    private readonly ModelExpression? _expression;

    private ExpressionParseResult(ModelExpression? expression, ExpressionError? error)
    {
        _expression = expression;
        Error = error;
    }

    /// <summary>True when the expression compiled; then <see cref="Error"/> is null.</summary>
    public bool IsSuccess => _expression is not null;

    /// <summary>The compiled expression; throws when the parse failed.</summary>
    public ModelExpression Expression => _expression ?? throw new InvalidOperationException("The expression was refused: " + Error!.Message);

    /// <summary>The problem, or null on success.</summary>
    public ExpressionError? Error { get; }

    internal static ExpressionParseResult Success(ModelExpression expression) => new(expression, null);

    internal static ExpressionParseResult Failure(ExpressionError error) => new(null, error);
}
