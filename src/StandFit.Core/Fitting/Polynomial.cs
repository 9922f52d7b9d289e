using System.Collections.Immutable;
using System.Globalization;

namespace StandFit.Core.Fitting;

/// <summary>
/// y = sum_k c_k x^k over the powers <c>lowest..degree</c>. With lowest power 0 the parameters are
/// named offset (c0), gain (c1), c2, c3 ...; without the constant term, gain (c1), c2 ...
/// The straight line is degree 1; the straight line through zero is degree 1 without constant.
/// </summary>
public sealed class Polynomial : LinearModel
{
    public const int MaxDegree = 10;

    private readonly int _lowest;

    private Polynomial(int degree, bool intercept)
    {
        Degree = degree;
        _lowest = intercept ? 0 : 1;
        ParameterNames = [.. Enumerable.Range(_lowest, degree - _lowest + 1).Select(NameOfPower)];
        Name = (degree, intercept) switch
        {
            (1, true) => "straight-line",
            (1, false) => "straight-line-through-zero",
            (_, true) => string.Create(CultureInfo.InvariantCulture, $"polynomial-{degree}"),
            _ => string.Create(CultureInfo.InvariantCulture, $"polynomial-{degree}-through-zero"),
        };
    }

    public static Polynomial StraightLine { get; } = new(1, intercept: true);

    public static Polynomial StraightLineThroughZero { get; } = new(1, intercept: false);

    public int Degree { get; }

    public override string Name { get; }

    public override ImmutableArray<string> ParameterNames { get; }

    public override bool HasIntercept => _lowest == 0;

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

    public override double Evaluate(ReadOnlySpan<double> parameters, double x)
    {
        var sum = 0.0;
        for (var k = parameters.Length - 1; k >= 0; k--)
        {
            sum = sum * x + parameters[k];
        }

        return _lowest == 0 ? sum : sum * x;
    }

    internal override DoubleDouble EvaluatePrecise(ReadOnlySpan<double> parameters, double x)
    {
        var sum = new DoubleDouble(0, 0);
        for (var k = parameters.Length - 1; k >= 0; k--)
        {
            sum = (sum * x) + parameters[k];
        }

        return _lowest == 0 ? sum : sum * x;
    }

    public override void FillNaturalBasis(double x, Span<double> row)
    {
        for (var j = 0; j < row.Length; j++)
        {
            row[j] = IntegerPower(x, j + _lowest);
        }
    }

    public override void FillNaturalBasisDerivative(double x, Span<double> row)
    {
        for (var j = 0; j < row.Length; j++)
        {
            var k = j + _lowest;
            row[j] = k == 0 ? 0.0 : k * IntegerPower(x, k - 1);
        }
    }

    public override StimulusScaling ChooseScaling(double min, double max)
    {
        if (_lowest == 0)
        {
            var half = (max - min) / 2;
            return new StimulusScaling(min + half, half > 0 ? half : 1.0);
        }

        // Without a constant term the origin must stay where it is: scale only.
        var reach = Math.Max(Math.Abs(min), Math.Abs(max));
        return new StimulusScaling(0.0, reach > 0 ? reach : 1.0);
    }

    public override void FillBasis(double z, Span<double> row)
    {
        var power = _lowest == 0 ? 1.0 : z;
        for (var j = 0; j < row.Length; j++)
        {
            row[j] = power;
            power *= z;
        }
    }

    public override void FillNaturalMap(StimulusScaling scaling, Span<double> map)
    {
        // ((x - c) / h)^k = h^-k sum_j C(k, j) x^j (-c)^(k - j): b_j = sum_k a_k h^-k C(k, j) (-c)^(k - j).
        var p = ParameterCount;
        map.Clear();
        var c = scaling.Centre;
        var h = scaling.HalfRange;
        for (var kIndex = 0; kIndex < p; kIndex++)
        {
            var k = kIndex + _lowest;
            var hk = Math.Pow(h, -k);
            for (var jIndex = 0; jIndex <= kIndex; jIndex++)
            {
                var j = jIndex + _lowest;
                map[(jIndex * p) + kIndex] = hk * Binomial(k, j) * IntegerPower(-c, k - j);
            }
        }
    }

    private static double Binomial(int n, int k)
    {
        var result = 1.0;
        for (var i = 1; i <= k; i++)
        {
            result = result * (n - k + i) / i;
        }

        return result;
    }

    private static double IntegerPower(double value, int power)
    {
        var result = 1.0;
        for (var i = 0; i < power; i++)
        {
            result *= value;
        }

        return result;
    }
}
