namespace StandFit.Core.Fitting;

/// <summary>
/// Unevaluated sum hi + lo of two doubles (about 32 significant digits), for the residuals of the
/// refinement step: error-free TwoSum and FMA-based TwoProduct.
/// </summary>
internal readonly record struct DoubleDouble(double Hi, double Lo)
{
    public static DoubleDouble Zero { get; } = new(0, 0);

    public static DoubleDouble One { get; } = new(1, 0);

    public static DoubleDouble operator +(DoubleDouble a, double b)
    {
        var (s, e) = TwoSum(a.Hi, b);
        return Normalise(s, e + a.Lo);
    }

    public static DoubleDouble operator +(DoubleDouble a, DoubleDouble b)
    {
        var (s, e) = TwoSum(a.Hi, b.Hi);
        return Normalise(s, e + a.Lo + b.Lo);
    }

    public static DoubleDouble operator -(DoubleDouble a) => new(-a.Hi, -a.Lo);

    public static DoubleDouble operator *(DoubleDouble a, double b)
    {
        var p = a.Hi * b;
        var e = Math.FusedMultiplyAdd(a.Hi, b, -p);
        return Normalise(p, e + (a.Lo * b));
    }

    public static DoubleDouble operator *(DoubleDouble a, DoubleDouble b)
    {
        var p = a.Hi * b.Hi;
        var e = Math.FusedMultiplyAdd(a.Hi, b.Hi, -p);
        return Normalise(p, e + (a.Hi * b.Lo) + (a.Lo * b.Hi));
    }

    /// <summary>a / b to about 32 digits: the double quotient and one correction from the exact remainder.</summary>
    public static DoubleDouble operator /(DoubleDouble a, double b)
    {
        var q = a.Hi / b;
        var remainder = a + (new DoubleDouble(q, 0) * -b);
        return Normalise(q, remainder.Hi / b);
    }

    /// <summary>The square root to about 32 digits: the double root and one Newton correction.</summary>
    public static DoubleDouble Sqrt(double x)
    {
        if (!(x > 0))
        {
            return new DoubleDouble(Math.Sqrt(x), 0);
        }

        var s = Math.Sqrt(x);
        var e = Math.FusedMultiplyAdd(-s, s, x);
        return Normalise(s, e / (2 * s));
    }

    /// <summary>y - value, rounded to the nearest double.</summary>
    public static double Subtract(double y, DoubleDouble value)
    {
        var (s, e) = TwoSum(y, -value.Hi);
        return s + (e - value.Lo);
    }

    public double ToDouble() => Hi + Lo;

    private static (double Sum, double Error) TwoSum(double a, double b)
    {
        var s = a + b;
        var bb = s - a;
        return (s, (a - (s - bb)) + (b - bb));
    }

    private static DoubleDouble Normalise(double hi, double lo)
    {
        var s = hi + lo;
        return new DoubleDouble(s, lo - (s - hi));
    }
}
