using System.Globalization;

namespace StandFit.Core.Fitting;

/// <summary>
/// y = sum_k c_k x^k over the powers <c>lowest..degree</c> of one input. With lowest power 0 the
/// parameters are named offset (c0), gain (c1), c2, c3 ...; without the constant term, gain (c1),
/// c2 ... The straight line is degree 1; the straight line through zero is degree 1 without
/// constant. A <see cref="BasisModel"/> of the powers of x: with a constant the stimulus is centred
/// and scaled, without it only scaled.
/// </summary>
public sealed class Polynomial : BasisModel
{
    public const int MaxDegree = 10;

    private Polynomial(int degree, bool intercept)
        : base(Powers(degree, intercept).Select(k => k == 0 ? BasisTerm.Constant(1) : BasisTerm.Power(1, 0, k)), 1, Powers(degree, intercept).Select(NameOfPower), NameOf(degree, intercept))
    {
        Degree = degree;
    }

    public static Polynomial StraightLine { get; } = new(1, intercept: true);

    public static Polynomial StraightLineThroughZero { get; } = new(1, intercept: false);

    public int Degree { get; }

    /// <summary>A polynomial of degree 1 to <see cref="MaxDegree"/>.</summary>
    public static Polynomial OfDegree(int degree, bool intercept = true)
    {
        if (degree is < 1 or > MaxDegree)
        {
            throw new ArgumentOutOfRangeException(nameof(degree), degree, "Polynomial degree is 1 to 10.");
        }

        return degree == 1 ? (intercept ? StraightLine : StraightLineThroughZero) : new Polynomial(degree, intercept);
    }

    public static string NameOfPower(int power) => power switch
    {
        0 => "offset",
        1 => "gain",
        _ => string.Create(CultureInfo.InvariantCulture, $"c{power}"),
    };

    /// <summary>Horner's rule on the natural coefficients.</summary>
    public override double Evaluate(ReadOnlySpan<double> parameters, ReadOnlySpan<double> x)
    {
        var sum = 0.0;
        for (var k = parameters.Length - 1; k >= 0; k--)
        {
            sum = (sum * x[0]) + parameters[k];
        }

        return HasIntercept ? sum : sum * x[0];
    }

    internal override DoubleDouble EvaluatePrecise(ReadOnlySpan<double> parameters, ReadOnlySpan<double> x)
    {
        var sum = DoubleDouble.Zero;
        for (var k = parameters.Length - 1; k >= 0; k--)
        {
            sum = (sum * x[0]) + parameters[k];
        }

        return HasIntercept ? sum : sum * x[0];
    }

    private static IEnumerable<int> Powers(int degree, bool intercept) => Enumerable.Range(intercept ? 0 : 1, degree + (intercept ? 1 : 0));

    private static string NameOf(int degree, bool intercept) => (degree, intercept) switch
    {
        (1, true) => "straight-line",
        (1, false) => "straight-line-through-zero",
        (_, true) => string.Create(CultureInfo.InvariantCulture, $"polynomial-{degree}"),
        _ => string.Create(CultureInfo.InvariantCulture, $"polynomial-{degree}-through-zero"),
    };
}
