using System.Collections.Immutable;
using System.Globalization;
using System.Text;

namespace StandFit.Core.Fitting;

/// <summary>
/// y = sum_j b_j t_j(x): a model linear in its parameters, built from named basis terms of one or
/// more inputs (<see cref="BasisTerm"/>): 1, x^k, 1/x, sqrt(x), ln(x)^k and products such as x1*x2.
/// <para>
/// Scaling for the solve. The monomial terms (1, x, x^2, x1*x2 ...) are evaluated on centred and
/// scaled inputs z_k = (x_k - c_k) / h_k; input k is centred only when the model's monomials are
/// closed under lowering its power (so that (x - c)^a expands into terms the model has: x^2 needs
/// x and 1), otherwise it is only scaled by its largest magnitude. Terms with a logarithm, a
/// square root or a negative power keep their natural meaning and are only column-equilibrated by
/// the fitter. Coefficients are always reported on the natural scale.
/// </para>
/// </summary>
public class BasisModel : LinearModel
{
    private readonly int _inputCount;
    private readonly bool[] _centrable;
    private readonly int _constantIndex;
    private readonly bool[] _scaled;              // input k appears in a monomial term (it is scaled)
    private readonly int[] _expansionStart;       // per term: its first entry in _expansionTarget (monomials only)
    private readonly int[] _expansionTarget;      // per entry: the natural term it adds to
    private readonly int[] _expansionPowers;      // per entry: the lowered power of each input

    /// <summary>A model of the given terms, with parameters named by <paramref name="parameterNames"/> (b0, b1 ... when null).</summary>
    public BasisModel(IEnumerable<BasisTerm> terms, int inputCount, IEnumerable<string>? parameterNames = null, string? name = null)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(inputCount, 1);
        Terms = [.. terms];
        if (Terms.IsEmpty)
        {
            throw new ArgumentException("A basis model needs at least one term.", nameof(terms));
        }

        if (Terms.Any(t => t.InputCount != inputCount))
        {
            throw new ArgumentException("Every term must be over the model's inputs.", nameof(terms));
        }

        if (Terms.Distinct().Count() != Terms.Length)
        {
            throw new ArgumentException("A basis model's terms must be different from each other.", nameof(terms));
        }

        ParameterNames = parameterNames is null
            ? [.. Enumerable.Range(0, Terms.Length).Select(j => "b" + j.ToString(CultureInfo.InvariantCulture))]
            : [.. parameterNames];
        if (ParameterNames.Length != Terms.Length || ParameterNames.Distinct(StringComparer.Ordinal).Count() != Terms.Length)
        {
            throw new ArgumentException("One distinct name per term.", nameof(parameterNames));
        }

        _inputCount = inputCount;
        _constantIndex = Terms.IndexOf(BasisTerm.Constant(inputCount));
        _centrable = new bool[inputCount];
        var monomials = Terms.Where(t => t.IsMonomial).ToHashSet();
        for (var k = 0; k < inputCount; k++)
        {
            _centrable[k] = ClosedUnderLowering(monomials, k);
        }

        _scaled = new bool[inputCount];
        for (var k = 0; k < inputCount; k++)
        {
            _scaled[k] = Terms.Any(t => t.IsMonomial && t.Uses(k));
        }

        (_expansionStart, _expansionTarget, _expansionPowers) = Expansions();
        Name = name ?? "basis(" + string.Join(", ", Terms.Select(t => t.Text)) + ")";
    }

    public ImmutableArray<BasisTerm> Terms { get; }

    public override string Name { get; }

    public override ImmutableArray<string> ParameterNames { get; }

    public override bool HasIntercept => _constantIndex >= 0;

    public override int InputCount => _inputCount;

    /// <summary>True when input k is centred before the monomial terms are built (see the class summary).</summary>
    public bool IsCentred(int input) => _centrable[input];

    public override void FillBasis(ReadOnlySpan<double> x, Span<double> row)
    {
        for (var j = 0; j < Terms.Length; j++)
        {
            row[j] = Terms[j].Value(x);
        }
    }

    internal override void FillBasisPrecise(ReadOnlySpan<double> x, Span<DoubleDouble> row)
    {
        for (var j = 0; j < Terms.Length; j++)
        {
            row[j] = Terms[j].ValuePrecise(x);
        }
    }

    public override void FillBasisDerivative(ReadOnlySpan<double> x, int input, Span<double> row)
    {
        for (var j = 0; j < Terms.Length; j++)
        {
            row[j] = Terms[j].Derivative(x, input);
        }
    }

    public override DesignScaling ChooseScaling(ReadOnlySpan<double> min, ReadOnlySpan<double> max)
    {
        var scalings = new StimulusScaling[_inputCount];
        for (var k = 0; k < _inputCount; k++)
        {
            if (!_scaled[k])
            {
                scalings[k] = StimulusScaling.None;
            }
            else if (_centrable[k])
            {
                var half = (max[k] - min[k]) / 2;
                scalings[k] = new StimulusScaling(min[k] + half, half > 0 ? half : 1.0);
            }
            else
            {
                // The origin must stay where it is: scale only.
                var reach = Math.Max(Math.Abs(min[k]), Math.Abs(max[k]));
                scalings[k] = new StimulusScaling(0.0, reach > 0 ? reach : 1.0);
            }
        }

        return new DesignScaling(System.Runtime.InteropServices.ImmutableCollectionsMarshal.AsImmutableArray(scalings));
    }

    public override void FillScaledBasis(ReadOnlySpan<double> x, DesignScaling scaling, Span<double> row)
    {
        Span<double> z = stackalloc double[_inputCount];
        for (var k = 0; k < _inputCount; k++)
        {
            z[k] = (x[k] - scaling[k].Centre) / scaling[k].HalfRange;
        }

        for (var j = 0; j < Terms.Length; j++)
        {
            row[j] = Terms[j].IsMonomial ? Terms[j].Value(z) : Terms[j].Value(x);
        }
    }

    public override void FillNaturalMap(DesignScaling scaling, Span<double> map)
    {
        // A monomial term on the scaled inputs, prod_k ((x_k - c_k) / h_k)^a_k, expands into
        // prod_k h_k^-a_k sum_{i_k <= a_k} C(a_k, i_k) x_k^i_k (-c_k)^(a_k - i_k); the natural
        // coefficient of the monomial x^i collects a_t times that factor from every term t. The
        // expansion's terms (which i, into which natural term) are listed once by the constructor,
        // in the order of the nested sums (i_1 outermost); an input with centre 0 keeps only
        // i_k = a_k. Nothing is allocated here.
        var p = ParameterCount;
        var m = _inputCount;
        map.Clear();
        for (var t = 0; t < p; t++)
        {
            var term = Terms[t];
            if (!term.IsMonomial)
            {
                map[(t * p) + t] = 1.0;
                continue;
            }

            for (var e = _expansionStart[t]; e < _expansionStart[t + 1]; e++)
            {
                var factor = 1.0;
                var kept = true;
                for (var k = 0; k < m; k++)
                {
                    var a = term.MonomialPower(k);
                    var i = _expansionPowers[(e * m) + k];
                    var c = scaling[k].Centre;
                    if (c == 0.0 && i < a)
                    {
                        kept = false;
                        break;
                    }

                    var scale = Math.Pow(scaling[k].HalfRange, -a);
                    factor = factor * scale * Binomial(a, i) * IntegerPower(-c, a - i);
                }

                if (!kept)
                {
                    continue;
                }

                var target = _expansionTarget[e];
                if (target < 0)
                {
                    throw new InvalidOperationException("A centred input's expansion needs a term the model does not have.");
                }

                map[(target * p) + t] += factor;
            }
        }
    }

    /// <summary>
    /// Every term of the expansion of each monomial term's (x - c)^a: the lowered powers i_k (0 to
    /// a_k, i_1 outermost) and the natural term x^i they add to (-1 when the model has no such
    /// term: the input is then never centred, and the entry is skipped).
    /// </summary>
    private (int[] Start, int[] Target, int[] Powers) Expansions()
    {
        var p = Terms.Length;
        var m = _inputCount;
        var index = new Dictionary<BasisTerm, int>();
        for (var j = 0; j < p; j++)
        {
            index[Terms[j]] = j;
        }

        var start = new int[p + 1];
        var targets = new List<int>();
        var powers = new List<int>();
        for (var t = 0; t < p; t++)
        {
            start[t] = targets.Count;
            var term = Terms[t];
            if (!term.IsMonomial)
            {
                continue;
            }

            var lowered = new int[m];
            while (true)
            {
                var half = new int[m];
                for (var k = 0; k < m; k++)
                {
                    half[k] = 2 * lowered[k];
                }

                targets.Add(index.TryGetValue(BasisTerm.Of(half, new int[m]), out var target) ? target : -1);
                powers.AddRange(lowered);

                // The next lowered powers, the last input fastest.
                var k2 = m - 1;
                while (k2 >= 0 && lowered[k2] == term.MonomialPower(k2))
                {
                    lowered[k2] = 0;
                    k2--;
                }

                if (k2 < 0)
                {
                    break;
                }

                lowered[k2]++;
            }
        }

        start[p] = targets.Count;
        return (start, [.. targets], [.. powers]);
    }

    public override DomainViolation? CheckDomain(ReadOnlySpan<double> x)
    {
        foreach (var term in Terms)
        {
            for (var k = 0; k < _inputCount; k++)
            {
                if (!term.Admits(k, x[k]))
                {
                    var symbol = BasisTerm.InputSymbols(_inputCount)[k];
                    return new DomainViolation(k, term.Text + " needs " + symbol + " " + term.Requirement(k));
                }
            }
        }

        return null;
    }

    /// <summary>
    /// The coefficient of term t has the output's unit over the term's unit: x_k contributes its
    /// unit to the power of the term (sqrt as ^0.5), a logarithm is dimensionless.
    /// </summary>
    public override string UnitOf(int parameter, ImmutableArray<string> inputUnits, string outputUnit)
    {
        var term = Terms[parameter];
        var over = new List<string>();
        var times = new List<string>();
        for (var k = 0; k < _inputCount; k++)
        {
            var unit = k < inputUnits.Length ? inputUnits[k] : "";
            var h = term.HalfPower(k);
            if (h == 0 || unit.Length == 0)
            {
                continue;
            }

            var magnitude = Math.Abs(h);
            var exponent = magnitude % 2 == 0
                ? (magnitude == 2 ? "" : "^" + (magnitude / 2).ToString(CultureInfo.InvariantCulture))
                : "^" + (magnitude / 2.0).ToString(CultureInfo.InvariantCulture);
            (h > 0 ? over : times).Add(unit + exponent);
        }

        return ComposeUnit(outputUnit, times, over);
    }

    /// <summary>numerator*times.../over or numerator*times.../(over*over); "" when nothing is known.</summary>
    protected static string ComposeUnit(string numerator, IReadOnlyList<string> times, IReadOnlyList<string> over)
    {
        var top = new StringBuilder(numerator);
        foreach (var t in times)
        {
            top.Append(top.Length == 0 ? "" : "*").Append(t);
        }

        if (over.Count == 0)
        {
            return top.ToString();
        }

        var bottom = over.Count == 1 ? over[0] : "(" + string.Join("*", over) + ")";
        return (top.Length == 0 ? "1" : top.ToString()) + "/" + bottom;
    }

    private static bool ClosedUnderLowering(HashSet<BasisTerm> monomials, int input)
    {
        foreach (var term in monomials)
        {
            var a = term.MonomialPower(input);
            for (var i = 0; i < a; i++)
            {
                var half = new int[term.InputCount];
                for (var k = 0; k < half.Length; k++)
                {
                    half[k] = k == input ? 2 * i : term.HalfPower(k);
                }

                if (!monomials.Contains(BasisTerm.Of(half, new int[term.InputCount])))
                {
                    return false;
                }
            }
        }

        return true;
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
