using System.Collections.Immutable;

namespace StandFit.Core.Problems;

/// <summary>Either a value or the problems that kept it from being made (never both).</summary>
public readonly struct Result<T>
{
    private readonly T? _value;

    private Result(T value)
    {
        _value = value;
        Problems = [];
        IsSuccess = true;
    }

    private Result(ImmutableArray<Problem> problems)
    {
        if (problems.IsDefaultOrEmpty)
        {
            throw new ArgumentException("A failed result needs at least one problem.", nameof(problems));
        }

        _value = default;
        Problems = problems;
        IsSuccess = false;
    }

    public bool IsSuccess { get; }

    public ImmutableArray<Problem> Problems { get; }

    public T Value => IsSuccess ? _value! : throw new InvalidOperationException("The result holds problems, not a value.");

    public static Result<T> Success(T value) => new(value);

    public static Result<T> Failure(Problem problem) => new([problem]);

    public static Result<T> Failure(IEnumerable<Problem> problems) => new([.. problems]);

    public static implicit operator Result<T>(Problem problem) => Failure(problem);

    public static implicit operator Result<T>(T value) => Success(value);

    public Result<TOut> Then<TOut>(Func<T, Result<TOut>> next) =>
        IsSuccess ? next(Value) : Result<TOut>.Failure(Problems);
}
