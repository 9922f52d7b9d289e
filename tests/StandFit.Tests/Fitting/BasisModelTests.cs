using System.Collections.Immutable;
using System.Globalization;
using StandFit.Core.Fitting;
using StandFit.Core.Problems;

namespace StandFit.Tests.Fitting;

/// <summary>
/// Basis terms and basis models: the term grammar and its canonical forms as docs/recipes.md
/// ("Basis terms") states them, the centring rule of the BasisModel class summary, and exact fits
/// of curves built from known coefficients (elementary algebra is the reference: the data are the
/// curve itself, so least squares must return its coefficients).
/// </summary>
public sealed class BasisModelTests
{
    private static BasisTerm Term(string text, int inputs = 1)
    {
        var (term, error) = BasisTermParser.Parse(text, inputs);
        Assert.True(error is null, $"'{text}': {error}");
        return term!;
    }

    private static BasisModel Model(int inputs, params string[] terms) => new(terms.Select(t => Term(t, inputs)), inputs);

    [Theory]
    [InlineData("1", "1")]
    [InlineData("x", "x")]
    [InlineData("x*x", "x^2")]
    [InlineData("x ^ 3", "x^3")]
    [InlineData("1/x", "1/x")]
    [InlineData("x^-1", "1/x")]
    [InlineData("1/x^2", "x^-2")]
    [InlineData("sqrt(x)", "sqrt(x)")]
    [InlineData("sqrt(x)*sqrt(x)", "x")]
    [InlineData("x*sqrt(x)", "sqrt(x)^3")]
    [InlineData("ln(x)", "ln(x)")]
    [InlineData("ln(x)^3", "ln(x)^3")]
    [InlineData("ln(x)*ln(x)", "ln(x)^2")]
    [InlineData("x*ln(x)", "x*ln(x)")]
    public void A_term_of_one_input_reads_to_its_canonical_form(string text, string canonical)
    {
        // docs/recipes.md, "Basis terms": repeated factors multiply; 1/x is x^-1.
        Assert.Equal(canonical, Term(text).Text);
    }

    [Theory]
    [InlineData("x1*x2", "x1*x2")]
    [InlineData("x2*x1", "x1*x2")]
    [InlineData("x1^2*x2", "x1^2*x2")]
    [InlineData("ln(x2)*x1", "x1*ln(x2)")]
    public void A_term_of_two_inputs_reads_to_its_canonical_form(string text, string canonical) =>
        Assert.Equal(canonical, Term(text, 2).Text);

    [Theory]
    [InlineData("log(x)", TermErrorKind.UnknownFunction, "log")]
    [InlineData("y", TermErrorKind.UnknownInput, "y")]
    [InlineData("ln(z)", TermErrorKind.UnknownInput, "z")]
    [InlineData("x^0", TermErrorKind.BadPower, "0")]
    [InlineData("x^11", TermErrorKind.BadPower, "11")]
    [InlineData("ln(x)^-1", TermErrorKind.BadPower, "-1")]
    [InlineData("1/ln(x)", TermErrorKind.BadPower, "1/ln")]
    [InlineData("x*1/x", TermErrorKind.BadPower, "x*1/x")]
    [InlineData("ln(x", TermErrorKind.Syntax, "end of the term")]
    [InlineData("x+1", TermErrorKind.Syntax, "+")]
    [InlineData("x^1.5", TermErrorKind.Syntax, ".")]
    [InlineData("", TermErrorKind.Syntax, "end of the term")]
    public void A_term_outside_the_grammar_is_refused_with_what_and_where(string text, TermErrorKind kind, string token)
    {
        var (term, error) = BasisTermParser.Parse(text, 1);

        Assert.Null(term);
        Assert.NotNull(error);
        Assert.Equal(kind, error.Kind);
        Assert.Equal(token, error.Token);
    }

    [Fact]
    public void Inputs_are_centred_only_when_their_lower_powers_are_terms()
    {
        // BasisModel class summary: x^2 needs x and 1 for x to be centred.
        Assert.True(Model(1, "1", "x", "x^2").IsCentred(0));
        Assert.False(Model(1, "x", "x^2").IsCentred(0));
        Assert.False(Model(1, "1", "x^2").IsCentred(0));
        var surface = Model(2, "1", "x1", "x2", "x1*x2");
        Assert.True(surface.IsCentred(0));
        Assert.True(surface.IsCentred(1));
        var partial = Model(2, "1", "x1", "x1*x2");
        Assert.False(partial.IsCentred(0)); // lowering x1 in x1*x2 needs x2
        Assert.True(partial.IsCentred(1));
    }

    [Fact]
    public void A_curve_of_logarithm_reciprocal_and_square_root_terms_is_fitted_back_exactly()
    {
        var model = Model(1, "1", "ln(x)", "1/x", "sqrt(x)");
        double[] truth = [2.5, -0.75, 40.0, 0.125];
        ImmutableArray<double> x = [.. Enumerable.Range(1, 30).Select(i => 10.0 * i)];
        ImmutableArray<double> y = [.. x.Select(v => model.Evaluate(truth, [v]))];

        var fit = LeastSquaresFitter.Fit(model, x, y).Value;

        for (var j = 0; j < truth.Length; j++)
        {
            Assert.True(Math.Abs(fit.Estimates[j] - truth[j]) <= 1e-11 * Math.Abs(truth[j]), string.Create(CultureInfo.InvariantCulture, $"{model.ParameterNames[j]}: {fit.Estimates[j]:R}, built with {truth[j]:R}"));
        }
    }

    [Fact]
    public void A_surface_far_from_the_origin_is_fitted_back_on_the_natural_scale()
    {
        // Inputs centred at 1000 and 300 with small spans: the natural map must undo the centring.
        var model = Model(2, "1", "x1", "x2", "x1^2", "x1*x2", "x2^2");
        double[] truth = [1.0, -2e-3, 5e-2, 3e-6, -4e-6, 2e-5];
        var points = (from p in Enumerable.Range(0, 7) from t in Enumerable.Range(0, 5) select (1000.0 + (5 * p), 300.0 + (2 * t))).ToList();
        ImmutableArray<double> x1 = [.. points.Select(q => q.Item1)];
        ImmutableArray<double> x2 = [.. points.Select(q => q.Item2)];
        ImmutableArray<double> y = [.. points.Select(q => model.Evaluate(truth, [q.Item1, q.Item2]))];

        var fit = LeastSquaresFitter.Fit(model, new FitData([x1, x2], y)).Value;

        Assert.True(fit.Scaling[0].Centre > 1000 && fit.Scaling[1].Centre > 300);
        for (var j = 0; j < truth.Length; j++)
        {
            Assert.True(Math.Abs(fit.Estimates[j] - truth[j]) <= 1e-8 * Math.Abs(truth[j]), string.Create(CultureInfo.InvariantCulture, $"{model.ParameterNames[j]}: {fit.Estimates[j]:R}, built with {truth[j]:R}"));
        }
    }

    [Theory]
    [InlineData("ln(x)^3", 2.718281828459045, 3.0 / 2.718281828459045)] // d/dx ln(x)^3 = 3 ln(x)^2 / x, ln(e) = 1
    [InlineData("x^3", 2.0, 12.0)] // 3 x^2
    [InlineData("1/x", 4.0, -1.0 / 16.0)] // -1 / x^2
    [InlineData("sqrt(x)", 9.0, 1.0 / 6.0)] // 1 / (2 sqrt(x))
    [InlineData("x*ln(x)", 1.0, 1.0)] // ln(x) + 1
    public void The_derivative_of_a_term_is_the_calculus_one(string text, double x, double expected)
    {
        var derivative = Term(text).Derivative([x], 0);
        Assert.True(Math.Abs(derivative - expected) <= 1e-15 * Math.Max(1, Math.Abs(expected)), string.Create(CultureInfo.InvariantCulture, $"d/dx {text} at {x}: {derivative:R}, expected {expected:R}"));
    }

    [Fact]
    public void Two_terms_that_are_the_same_function_on_the_sweep_are_rank_deficient()
    {
        // x2 = 2 x1 at every point: the terms x1 and x2 cannot be told apart.
        var model = Model(2, "1", "x1", "x2");
        ImmutableArray<double> x1 = [1, 2, 3, 4, 5, 6];
        ImmutableArray<double> x2 = [.. x1.Select(v => 2 * v)];
        ImmutableArray<double> y = [1.1, 2.0, 3.2, 3.9, 5.1, 6.0];

        var fit = LeastSquaresFitter.Fit(model, new FitData([x1, x2], y));

        Assert.Equal(ReasonCodes.FitRankDeficient.Code, Assert.Single(fit.Problems).Code);
    }

    [Fact]
    public void An_input_that_does_not_vary_is_a_zero_spread_naming_its_column()
    {
        var model = Model(2, "1", "x1", "x2");
        ImmutableArray<double> x1 = [1, 2, 3, 4, 5, 6];
        ImmutableArray<double> x2 = [25, 25, 25, 25, 25, 25];
        var data = new FitData([x1, x2], [.. x1]) { InputNames = ["pressure_kPa", "temp_C"] };

        var problem = Assert.Single(LeastSquaresFitter.Fit(model, data).Problems);

        Assert.Equal(ReasonCodes.FitZeroStimulusSpread.Code, problem.Code);
        Assert.Contains("'temp_C'", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_negative_power_at_zero_is_outside_the_domain()
    {
        var model = Model(1, "1", "1/x");
        var data = new FitData([0.0, 1, 2, 3, 4], [1.0, 2, 3, 4, 5]) { SourceName = "s.csv", SourceLines = [3, 4, 5, 6, 7] };

        var problem = Assert.Single(LeastSquaresFitter.Fit(model, data).Problems);

        Assert.Equal(ReasonCodes.FitDomain.Code, problem.Code);
        Assert.Equal(SourceLocation.At("s.csv", 3), problem.Location);
        Assert.Contains("1/x needs x != 0", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void A_term_that_overflows_on_the_natural_scale_is_a_non_finite_fit_not_an_exception()
    {
        // (1e40)^10 = 1e400 is beyond double range (IEEE 754 binary64 ends near 1.8e308).
        var model = Model(1, "1", "x^10");
        ImmutableArray<double> x = [1e39, 2e39, 5e39, 1e40, 2e40];

        var problem = Assert.Single(LeastSquaresFitter.Fit(model, x, [1.0, 2, 3, 4, 5]).Problems);

        Assert.Equal(ReasonCodes.FitNonFinite.Code, problem.Code);
    }
}
