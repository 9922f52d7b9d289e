namespace StandFit.Core.Fitting;

/// <summary>
/// Unevaluated sum hi + lo of two doubles (about 32 significant digits), for the residuals of the
/// refinement step: error-free TwoSum and FMA-based TwoProduct.
/// </summary>
internal readonly record struct DoubleDouble(double Hi, double Lo)
{
    public static DoubleDouble operator +(DoubleDouble a, double b)
    {
        var (s, e) = TwoSum(a.Hi, b);
        return Normalise(s, e + a.Lo);
    }

    public static DoubleDouble operator *(DoubleDouble a, double b)
    {
        var p = a.Hi * b;
        var e = Math.FusedMultiplyAdd(a.Hi, b, -p);
        return Normalise(p, e + (a.Lo * b));
    }

    /// <summary>y - value, rounded to the nearest double.</summary>
    public static double Subtract(double y, DoubleDouble value)
    {
        var (s, e) = TwoSum(y, -value.Hi);
        return s + (e - value.Lo);
    }

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
