using System.Collections.Immutable;
using System.Globalization;
using System.Text;

namespace StandFit.Core.Fitting;

/// <summary>
/// One basis function of a model linear in its parameters: a product over the inputs x_k of
/// x_k^(h_k / 2) ln(x_k)^(l_k), with integer half-powers h_k (so x, x^2, 1/x, sqrt(x), x*sqrt(x))
/// and log powers l_k &gt;= 0. The constant term 1 has every power 0. Terms are compared by their
/// powers: <c>x*x</c> and <c>x^2</c> are the same term.
/// </summary>
public sealed class BasisTerm : IEquatable<BasisTerm>
{
    /// <summary>The largest |power| of an input, and the largest power of a logarithm.</summary>
    public const int MaxPower = 10;

    private readonly int[] _halfPowers;
    private readonly int[] _logPowers;

    private BasisTerm(int[] halfPowers, int[] logPowers)
    {
        _halfPowers = halfPowers;
        _logPowers = logPowers;
        IsConstant = halfPowers.All(h => h == 0) && logPowers.All(l => l == 0);
        IsMonomial = halfPowers.All(h => h >= 0 && h % 2 == 0) && logPowers.All(l => l == 0);
        Text = Render(halfPowers, logPowers);
    }

    /// <summary>Number of inputs the term is defined over.</summary>
    public int InputCount => _halfPowers.Length;

    /// <summary>True for the constant term 1.</summary>
    public bool IsConstant { get; }

    /// <summary>True for a product of non-negative integer powers (1, x, x^2, x1*x2): the terms that may be centred.</summary>
    public bool IsMonomial { get; }

    /// <summary>The canonical text: <c>1</c>, <c>x^2</c>, <c>ln(x)^3</c>, <c>x1*x2</c>.</summary>
    public string Text { get; }

    /// <summary>The constant term over <paramref name="inputCount"/> inputs.</summary>
    public static BasisTerm Constant(int inputCount) => new(new int[inputCount], new int[inputCount]);

    /// <summary>x_input^power (power may be negative, not 0 unless the constant is meant).</summary>
    public static BasisTerm Power(int inputCount, int input, int power)
    {
        var h = new int[inputCount];
        h[input] = 2 * power;
        return new BasisTerm(h, new int[inputCount]);
    }

    /// <summary>ln(x_input)^power, power &gt;= 1.</summary>
    public static BasisTerm LogPower(int inputCount, int input, int power)
    {
        var l = new int[inputCount];
        l[input] = power;
        return new BasisTerm(new int[inputCount], l);
    }

    /// <summary>The term with the given half-powers and log powers per input.</summary>
    public static BasisTerm Of(ReadOnlySpan<int> halfPowers, ReadOnlySpan<int> logPowers)
    {
        if (halfPowers.Length != logPowers.Length || halfPowers.Length == 0)
        {
            throw new ArgumentException("A term needs one half-power and one log power per input.");
        }

        foreach (var l in logPowers)
        {
            if (l < 0)
            {
                throw new ArgumentException("Log powers are not negative.");
            }
        }

        return new BasisTerm(halfPowers.ToArray(), logPowers.ToArray());
    }

    /// <summary>The power of input k, doubled (x is 2, sqrt(x) is 1, 1/x is -2).</summary>
    public int HalfPower(int input) => _halfPowers[input];

    /// <summary>The power of ln(x_k).</summary>
    public int LogPowerOf(int input) => _logPowers[input];

    /// <summary>The integer power of input k in a monomial term.</summary>
    public int MonomialPower(int input) => _halfPowers[input] / 2;

    /// <summary>True when the term depends on input k.</summary>
    public bool Uses(int input) => _halfPowers[input] != 0 || _logPowers[input] != 0;

    /// <summary>
    /// What the term needs of input k's value, or null when any finite value will do: ln needs
    /// x &gt; 0, a negative power x != 0, a square root x &gt;= 0 (x &gt; 0 with a negative power).
    /// </summary>
    public string? Requirement(int input)
    {
        var h = _halfPowers[input];
        var l = _logPowers[input];
        if (l > 0 || (h < 0 && h % 2 != 0))
        {
            return "> 0";
        }

        if (h % 2 != 0)
        {
            return ">= 0";
        }

        return h < 0 ? "!= 0" : null;
    }

    /// <summary>True when <paramref name="value"/> meets <see cref="Requirement"/> for input k.</summary>
    public bool Admits(int input, double value) => Requirement(input) switch
    {
        "> 0" => value > 0,
        ">= 0" => value >= 0,
        "!= 0" => value != 0,
        _ => true,
    };

    /// <summary>The term's value at the point <paramref name="x"/> (one value per input).</summary>
    public double Value(ReadOnlySpan<double> x)
    {
        var value = 1.0;
        for (var k = 0; k < _halfPowers.Length; k++)
        {
            if (Uses(k))
            {
                value *= Factor(x[k], _halfPowers[k], _logPowers[k]);
            }
        }

        return value;
    }

    /// <summary>The term's value in double-double: powers and square roots to about 32 digits, logarithms as rounded doubles.</summary>
    internal DoubleDouble ValuePrecise(ReadOnlySpan<double> x)
    {
        var value = DoubleDouble.One;
        for (var k = 0; k < _halfPowers.Length; k++)
        {
            var h = _halfPowers[k];
            var l = _logPowers[k];
            if (h == 0 && l == 0)
            {
                continue;
            }

            var xk = x[k];
            var whole = Math.Abs(h) / 2;
            var power = DoubleDouble.One;
            for (var i = 0; i < whole; i++)
            {
                power *= xk;
            }

            if (h % 2 != 0)
            {
                power *= DoubleDouble.Sqrt(xk);
            }

            value = h < 0 ? Reciprocal(value, power) : value * power;
            if (l > 0)
            {
                var ln = Math.Log(xk);
                for (var i = 0; i < l; i++)
                {
                    value *= ln;
                }
            }
        }

        return value;
    }

    /// <summary>The partial derivative of the term with respect to input k at the point <paramref name="x"/>.</summary>
    public double Derivative(ReadOnlySpan<double> x, int input)
    {
        if (!Uses(input))
        {
            return 0.0;
        }

        var rest = 1.0;
        for (var k = 0; k < _halfPowers.Length; k++)
        {
            if (k != input && Uses(k))
            {
                rest *= Factor(x[k], _halfPowers[k], _logPowers[k]);
            }
        }

        // d/dx [x^a ln(x)^l] = x^(a-1) ln(x)^(l-1) (a ln(x) + l), a = h / 2.
        var xi = x[input];
        var h = _halfPowers[input];
        var l = _logPowers[input];
        var a = h / 2.0;
        if (l == 0)
        {
            return rest * a * Factor(xi, h - 2, 0);
        }

        var ln = Math.Log(xi);
        return rest * Factor(xi, h - 2, 0) * IntegerPower(ln, l - 1) * ((a * ln) + l);
    }

    public bool Equals(BasisTerm? other) =>
        other is not null && _halfPowers.AsSpan().SequenceEqual(other._halfPowers) && _logPowers.AsSpan().SequenceEqual(other._logPowers);

    public override bool Equals(object? obj) => Equals(obj as BasisTerm);

    public override int GetHashCode() => Text.GetHashCode(StringComparison.Ordinal);

    public override string ToString() => Text;

    /// <summary>The names of the inputs as terms write them: x for one input, x1, x2 ... for several.</summary>
    public static ImmutableArray<string> InputSymbols(int inputCount) =>
        inputCount == 1 ? ["x"] : [.. Enumerable.Range(1, inputCount).Select(k => "x" + k.ToString(CultureInfo.InvariantCulture))];

    private static DoubleDouble Reciprocal(DoubleDouble numerator, DoubleDouble denominator)
    {
        // numerator / denominator with a double-double denominator: one Newton step on the quotient.
        var q = numerator.Hi / denominator.Hi;
        var remainder = numerator + -(denominator * q);
        return new DoubleDouble(q, 0) + (remainder.Hi / denominator.Hi);
    }

    private static double Factor(double x, int halfPower, int logPower)
    {
        var whole = IntegerPower(x, Math.Abs(halfPower) / 2);
        if (halfPower % 2 != 0)
        {
            whole *= Math.Sqrt(x);
        }

        var value = halfPower < 0 ? 1.0 / whole : whole;
        return logPower == 0 ? value : value * IntegerPower(Math.Log(x), logPower);
    }

    private static double IntegerPower(double x, int power)
    {
        var result = 1.0;
        for (var i = 0; i < power; i++)
        {
            result *= x;
        }

        return result;
    }

    private static string Render(int[] halfPowers, int[] logPowers)
    {
        var symbols = InputSymbols(halfPowers.Length);
        var factors = new List<string>();
        for (var k = 0; k < halfPowers.Length; k++)
        {
            var h = halfPowers[k];
            var s = symbols[k];
            if (h != 0)
            {
                factors.Add(h % 2 == 0
                    ? (h == 2 ? s : string.Create(CultureInfo.InvariantCulture, $"{s}^{h / 2}"))
                    : (h == 1 ? $"sqrt({s})" : string.Create(CultureInfo.InvariantCulture, $"sqrt({s})^{h}")));
            }

            var l = logPowers[k];
            if (l != 0)
            {
                factors.Add(l == 1 ? $"ln({s})" : string.Create(CultureInfo.InvariantCulture, $"ln({s})^{l}"));
            }
        }

        if (factors.Count == 0)
        {
            return "1";
        }

        if (factors.Count == 1 && factors[0].EndsWith("^-1", StringComparison.Ordinal) && !factors[0].StartsWith("sqrt", StringComparison.Ordinal))
        {
            return "1/" + factors[0][..^3];
        }

        var text = new StringBuilder();
        foreach (var f in factors)
        {
            text.Append(text.Length == 0 ? "" : "*").Append(f);
        }

        return text.ToString();
    }
}
