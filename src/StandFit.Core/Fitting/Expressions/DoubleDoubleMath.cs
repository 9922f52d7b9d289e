namespace StandFit.Core.Fitting.Expressions;

/// <summary>
/// Arithmetic and the expression language's functions on <see cref="DoubleDouble"/> values (about
/// 32 significant digits), for residuals that keep their digits when the fit is nearly exact. Built
/// from the error-free transformations TwoSum and TwoProduct (FMA): exp by reduction modulo ln 2,
/// halving and a Taylor series squared back; ln by one Newton step on exp; sin and cos by reduction
/// modulo pi/2 and Taylor series; atan by one Newton step on tan; sqrt by one Newton step.
/// Relative accuracy is near 1e-30 for arguments of moderate size (|x| up to about 1e6 for the
/// trigonometric functions).
/// </summary>
internal static class DoubleDoubleMath
{
    // ln 2, ln 10, pi and pi/2 split into double-double (and a third part for pi/2), from mpmath at 50 digits.
    private static readonly DoubleDouble Ln2 = new(0.6931471805599453, 2.3190468138462996e-17);
    private static readonly DoubleDouble Ln10 = new(2.302585092994046, -2.1707562233822494e-16);
    private const double PiOver2Hi = 1.5707963267948966;
    private const double PiOver2Mid = 6.123233995736766e-17;
    private const double PiOver2Lo = -1.4973849048591698e-33;

    private const int ExpDegree = 9;
    private const int TrigTerms = 13;

    /// <summary>1/n! for n = 0..27, each to double-double precision (computed once by division).</summary>
    private static readonly DoubleDouble[] InverseFactorials = MakeInverseFactorials((2 * TrigTerms) + 2);

    /// <summary>pi as a double-double.</summary>
    public static DoubleDouble Pi { get; } = new(3.141592653589793, 1.2246467991473532e-16);

    public static DoubleDouble One { get; } = new(1.0, 0.0);

    public static DoubleDouble Of(double value) => new(value, 0.0);

    public static DoubleDouble Add(DoubleDouble a, DoubleDouble b)
    {
        var sum = a.Hi + b.Hi;
        if (!double.IsFinite(sum))
        {
            return Of(sum);
        }

        var (s, e) = TwoSum(a.Hi, b.Hi);
        var (t, f) = TwoSum(a.Lo, b.Lo);
        e += t;
        (s, e) = QuickTwoSum(s, e);
        e += f;
        return Normalised(s, e);
    }

    public static DoubleDouble Negate(DoubleDouble a) => new(-a.Hi, -a.Lo);

    public static DoubleDouble Subtract(DoubleDouble a, DoubleDouble b) => Add(a, Negate(b));

    public static DoubleDouble Multiply(DoubleDouble a, DoubleDouble b)
    {
        var p = a.Hi * b.Hi;
        var e = Math.FusedMultiplyAdd(a.Hi, b.Hi, -p);
        e += (a.Hi * b.Lo) + (a.Lo * b.Hi);
        return Normalised(p, e);
    }

    public static DoubleDouble Multiply(DoubleDouble a, double b)
    {
        var p = a.Hi * b;
        var e = Math.FusedMultiplyAdd(a.Hi, b, -p);
        e += a.Lo * b;
        return Normalised(p, e);
    }

    public static DoubleDouble Divide(DoubleDouble a, DoubleDouble b)
    {
        var q1 = a.Hi / b.Hi;
        if (!double.IsFinite(q1))
        {
            return Of(q1);
        }

        var r = Subtract(a, Multiply(b, q1));
        var q2 = r.Hi / b.Hi;
        r = Subtract(r, Multiply(b, q2));
        var q3 = r.Hi / b.Hi;
        var (s, e) = QuickTwoSum(q1, q2);
        return Add(new DoubleDouble(s, e), Of(q3));
    }

    public static DoubleDouble Divide(DoubleDouble a, double b) => Divide(a, Of(b));

    public static DoubleDouble Sqrt(DoubleDouble a)
    {
        if (!(a.Hi > 0))
        {
            return Of(a.Hi == 0 ? 0.0 : double.NaN);
        }

        if (double.IsPositiveInfinity(a.Hi))
        {
            return a;
        }

        var x = Math.Sqrt(a.Hi);
        var p = x * x;
        var residual = Subtract(a, new DoubleDouble(p, Math.FusedMultiplyAdd(x, x, -p)));
        return Normalised(x, residual.Hi / (2.0 * x));
    }

    public static DoubleDouble Exp(DoubleDouble a)
    {
        if (double.IsNaN(a.Hi))
        {
            return a;
        }

        if (a.Hi > 709.8)
        {
            return Of(double.PositiveInfinity);
        }

        if (a.Hi < -745.2)
        {
            return Of(0.0);
        }

        // a = k ln 2 + r, |r| <= ln2 / 2; exp(r) - 1 from its Taylor polynomial at r / 2^10
        // (|r| < 3.4e-4, so degree 9 leaves less than 1e-35), then doubled back ten times by
        // (1 + s)^2 - 1 = s (2 + s), which keeps the small quantity s accurate.
        const int Halvings = 10;
        var k = Math.Round(a.Hi / Ln2.Hi);
        var r = Subtract(a, Multiply(Ln2, k));
        r = new DoubleDouble(Math.ScaleB(r.Hi, -Halvings), Math.ScaleB(r.Lo, -Halvings));
        var s = InverseFactorials[ExpDegree];
        for (var i = ExpDegree - 1; i >= 1; i--)
        {
            s = Add(Multiply(s, r), InverseFactorials[i]);
        }

        s = Multiply(s, r);
        for (var i = 0; i < Halvings; i++)
        {
            s = Multiply(s, Add(s, Of(2.0)));
        }

        var result = Add(s, One);
        var scale = (int)k;
        return new DoubleDouble(Math.ScaleB(result.Hi, scale), Math.ScaleB(result.Lo, scale));
    }

    public static DoubleDouble Log(DoubleDouble a)
    {
        if (!(a.Hi > 0))
        {
            return Of(a.Hi == 0 ? double.NegativeInfinity : double.NaN);
        }

        if (double.IsPositiveInfinity(a.Hi))
        {
            return a;
        }

        // One Newton step on exp(x) = a from the double logarithm: x + a exp(-x) - 1.
        var x = Math.Log(a.Hi);
        var correction = Subtract(Multiply(a, Exp(Of(-x))), One);
        return Add(Of(x), correction);
    }

    public static DoubleDouble Log10(DoubleDouble a) => Divide(Log(a), Ln10);

    public static DoubleDouble Sin(DoubleDouble a) => SinCos(a).Sin;

    public static DoubleDouble Cos(DoubleDouble a) => SinCos(a).Cos;

    public static DoubleDouble Tan(DoubleDouble a)
    {
        var (sin, cos) = SinCos(a);
        return Divide(sin, cos);
    }

    public static DoubleDouble Atan(DoubleDouble a)
    {
        if (double.IsNaN(a.Hi))
        {
            return a;
        }

        if (double.IsInfinity(a.Hi))
        {
            return Multiply(new DoubleDouble(PiOver2Hi, PiOver2Mid), Math.Sign(a.Hi));
        }

        // Beyond 1, atan(a) = sign(a) pi/2 - atan(1/a): Newton's step on tan is then accurate
        // (its second-order error grows with tan x).
        if (Math.Abs(a.Hi) > 1.0)
        {
            var halfPi = Multiply(new DoubleDouble(PiOver2Hi, PiOver2Mid), Math.Sign(a.Hi));
            return Subtract(halfPi, Atan(Divide(One, a)));
        }

        // One Newton step on tan(x) = a from the double arctangent: x + (a cos x - sin x) cos x.
        var x = Math.Atan(a.Hi);
        var (sin, cos) = SinCos(Of(x));
        var correction = Multiply(Subtract(Multiply(a, cos), sin), cos);
        return Add(Of(x), correction);
    }

    /// <summary>a^b: integer b by repeated squaring (any sign of a), otherwise exp(b ln a) for a &gt; 0.</summary>
    public static DoubleDouble Power(DoubleDouble a, DoubleDouble b)
    {
        if (b.Lo == 0 && b.Hi == Math.Round(b.Hi) && Math.Abs(b.Hi) <= 1024)
        {
            return IntegerPower(a, (int)b.Hi);
        }

        if (a.Hi == 0 && a.Lo == 0)
        {
            return Of(b.Hi > 0 ? 0.0 : double.PositiveInfinity);
        }

        return a.Hi < 0 ? Of(double.NaN) : Exp(Multiply(b, Log(a)));
    }

    public static DoubleDouble IntegerPower(DoubleDouble a, int n)
    {
        if (n == 0)
        {
            return One;
        }

        var result = One;
        var square = a;
        var m = Math.Abs(n);
        while (m > 0)
        {
            if ((m & 1) != 0)
            {
                result = Multiply(result, square);
            }

            m >>= 1;
            if (m > 0)
            {
                square = Multiply(square, square);
            }
        }

        return n < 0 ? Divide(One, result) : result;
    }

    /// <summary>The double-double value of one operation of the language (for folding and for the precise evaluator).</summary>
    public static DoubleDouble Apply(Operation operation, DoubleDouble a, DoubleDouble b) => operation switch
    {
        Operation.Add => Add(a, b),
        Operation.Subtract => Subtract(a, b),
        Operation.Multiply => Multiply(a, b),
        Operation.Divide => Divide(a, b),
        Operation.Power => Power(a, b),
        Operation.Negate => Negate(a),
        Operation.Exp => Exp(a),
        Operation.Ln => Log(a),
        Operation.Log10 => Log10(a),
        Operation.Sqrt => Sqrt(a),
        Operation.Sin => Sin(a),
        Operation.Cos => Cos(a),
        Operation.Tan => Tan(a),
        Operation.Atan => Atan(a),
        _ => throw new ArgumentOutOfRangeException(nameof(operation), operation, "Not an arithmetic operation."),
    };

    private static (DoubleDouble Sin, DoubleDouble Cos) SinCos(DoubleDouble a)
    {
        if (!double.IsFinite(a.Hi))
        {
            return (Of(double.NaN), Of(double.NaN));
        }

        // a = k pi/2 + r with |r| <= pi/4; k pi/2 in three parts, each product error-free.
        var k = Math.Round(a.Hi / PiOver2Hi);
        var r = Subtract(a, TwoProduct(k, PiOver2Hi));
        r = Subtract(r, TwoProduct(k, PiOver2Mid));
        r = Subtract(r, Of(k * PiOver2Lo));

        // Taylor polynomials in r^2 by Horner's rule; |r| <= pi/4, so the terms left out are below 1e-33.
        var r2 = Multiply(r, r);
        var sin = Signed(InverseFactorials[(2 * TrigTerms) + 1], TrigTerms);
        var cos = Signed(InverseFactorials[2 * TrigTerms], TrigTerms);
        for (var i = TrigTerms - 1; i >= 0; i--)
        {
            sin = Add(Multiply(sin, r2), Signed(InverseFactorials[(2 * i) + 1], i));
            cos = Add(Multiply(cos, r2), Signed(InverseFactorials[2 * i], i));
        }

        sin = Multiply(sin, r);
        var quadrant = (int)(((k % 4) + 4) % 4);
        return quadrant switch
        {
            0 => (sin, cos),
            1 => (cos, Negate(sin)),
            2 => (Negate(sin), Negate(cos)),
            _ => (Negate(cos), sin),
        };
    }

    private static DoubleDouble Signed(DoubleDouble value, int i) => (i & 1) == 0 ? value : Negate(value);

    private static DoubleDouble[] MakeInverseFactorials(int count)
    {
        var table = new DoubleDouble[count];
        table[0] = new DoubleDouble(1.0, 0.0);
        for (var n = 1; n < count; n++)
        {
            table[n] = Divide(table[n - 1], n);
        }

        return table;
    }

    private static DoubleDouble TwoProduct(double a, double b)
    {
        var p = a * b;
        return new DoubleDouble(p, Math.FusedMultiplyAdd(a, b, -p));
    }

    private static (double Sum, double Error) TwoSum(double a, double b)
    {
        var s = a + b;
        var bb = s - a;
        return (s, (a - (s - bb)) + (b - bb));
    }

    private static (double Sum, double Error) QuickTwoSum(double a, double b)
    {
        var s = a + b;
        return (s, b - (s - a));
    }

    private static DoubleDouble Normalised(double hi, double lo)
    {
        if (!double.IsFinite(hi))
        {
            return new DoubleDouble(hi, 0.0);
        }

        var (s, e) = QuickTwoSum(hi, lo);
        return new DoubleDouble(s, e);
    }
}
