using System.Collections.Immutable;
using System.Reflection;
using System.Runtime.InteropServices;
using StandFit.Core.Fitting;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Tests.Reference;
using StandFit.Tests.Support;
using Xunit.Abstractions;

namespace StandFit.Tests.Fitting;

/// <summary>
/// Issue #3, "nothing allocated per fit beyond the result": a warmed fit (the thread's workspace
/// already grown) allocates at most the arrays its result keeps plus <see cref="SlackBytes"/> for
/// the result objects themselves (FitResult or NonlinearFitResult, DesignScaling, the status text).
/// The result's arrays are found by reflection over its public ImmutableArray properties, so the
/// budget follows the result's shape and is not a number written here; arrays the fit was given
/// (the data's own columns, the start vector) are not counted, since the fit did not allocate them.
/// Array sizes are the 64-bit CLR's: a 24-byte header, then the elements, rounded up to 8 bytes
/// (common practice: the runtime's object layout). The data are NIST StRD files
/// (../shared/reference/nist-strd): Norris (straight line), Wampler1 (a quintic), Filip (degree 10),
/// Longley (six inputs) and Misra1a and Chwirut2 (nonlinear).
/// </summary>
public sealed class FitAllocationTests(ITestOutputHelper log)
{
    /// <summary>
    /// Room for the result objects: the result class itself (about 200 bytes of fields), a
    /// DesignScaling record, and the formatting of a nonlinear fit's status sentence (its
    /// interpolation and number text, about 200 bytes).
    /// </summary>
    public const int SlackBytes = 512;

    [Theory]
    [InlineData("Norris.dat", 1)]
    [InlineData("Wampler1.dat", 5)]
    [InlineData("Filip.dat", 10)]
    public void A_warmed_polynomial_fit_allocates_only_its_result(string file, int degree)
    {
        // Polynomials of the StRD files' own degrees (NIST StRD linear: Norris 1, Wampler1 5, Filip 10).
        var strd = StrdFile.Linear(file);
        var data = new FitData(strd.Predictors[0], strd.Y);
        var model = Polynomial.OfDegree(degree);
        AssertOnlyResult(() => LeastSquaresFitter.Fit(model, data).Value, data.Inputs, data.Output);
    }

    [Fact]
    public void A_warmed_fit_of_several_inputs_allocates_only_its_result()
    {
        // Longley: y on six predictors with a constant (NIST StRD linear).
        var strd = StrdFile.Linear("Longley.dat");
        var data = new FitData(strd.Predictors, strd.Y);
        var terms = new List<BasisTerm> { BasisTerm.Constant(6) };
        for (var k = 0; k < 6; k++)
        {
            terms.Add(BasisTerm.Power(6, k, 1));
        }

        var model = new BasisModel(terms, 6);
        AssertOnlyResult(() => LeastSquaresFitter.Fit(model, data).Value, data.Inputs, data.Output);
    }

    [Fact]
    public void A_warmed_weighted_steinhart_hart_fit_allocates_only_its_result()
    {
        // A 10 kohm NTC by the Beta equation (B = 3950 K, common practice for such parts) from
        // -20 to 80 degC, with a standard uncertainty of 10 mK on every reading: the weighted path.
        const int n = 41;
        var r = new double[n];
        var t = new double[n];
        var u = new double[n];
        for (var i = 0; i < n; i++)
        {
            t[i] = 253.15 + (100.0 * i / (n - 1));
            r[i] = 10000 * Math.Exp(3950 * ((1 / t[i]) - (1 / 298.15)));
            u[i] = 0.01;
        }

        var data = new FitData([.. r], [.. t]) { Uncertainties = [.. u] };
        var model = new SteinhartHart(TemperatureScale.Kelvin);
        AssertOnlyResult(() => LeastSquaresFitter.Fit(model, data).Value, data.Inputs, data.Output, data.Uncertainties);
    }

    [Theory]
    [InlineData("Misra1a")]
    [InlineData("Chwirut2")]
    public void A_warmed_levenberg_marquardt_fit_allocates_only_its_result(string name)
    {
        // NIST StRD nonlinear, from Start 2 (both converge: docs/accuracy.md).
        var strdCase = name == "Misra1a" ? StrdNonlinearCases.Misra1a : StrdNonlinearCases.Chwirut2;
        var model = strdCase.Model;
        var inputs = strdCase.Dataset.Predictors;
        var y = strdCase.Response;
        var start = strdCase.Dataset.Start(2);
        AssertOnlyResult(
            () =>
            {
                var fit = LevenbergMarquardt.Fit(model, inputs, y, start).Value;
                Assert.True(fit.Converged);
                return fit;
            },
            [.. inputs],
            y,
            start);
    }

    [Fact]
    public void A_warmed_expression_model_fit_allocates_only_its_result()
    {
        // The fit benchmark's exponential rise (bench/StandFit.Benchmarks/FitBenchmarks.cs), made
        // from y0 = 0.5, span = 4, tau = 30 with a deterministic wobble in place of noise.
        const int n = 41;
        var x = new double[n];
        var y = new double[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = 100.0 * i / (n - 1);
            y[i] = 0.5 + (4.0 * (1 - Math.Exp(-x[i] / 30))) + (0.002 * Math.Sin(7.0 * i));
        }

        var parsed = ExpressionParser.Parse("y0 + span*(1 - exp(-x/tau))", ["x"], ["y0", "span", "tau"]);
        var model = new ExpressionModel(parsed.Expression!, [new("y0", 0), new("span", 3), new("tau", 20)]);
        var data = new FitData([.. x], [.. y]);
        AssertOnlyResult(
            () =>
            {
                var outcome = NonlinearFitter.Fit(model, data);
                Assert.Null(outcome.Problem);
                return outcome.Search!;
            },
            data.Inputs,
            data.Output,
            model.Start);
    }

    private void AssertOnlyResult(Func<object> fit, ImmutableArray<ImmutableArray<double>> inputs, ImmutableArray<double> output, ImmutableArray<double> alsoGiven = default)
    {
        // Warm: JIT, static caches, the thread's workspace grown to this shape.
        fit();
        fit();
        var before = GC.GetAllocatedBytesForCurrentThread();
        var result = fit();
        var allocated = GC.GetAllocatedBytesForCurrentThread() - before;

        var given = new HashSet<object>(ReferenceEqualityComparer.Instance) { ImmutableCollectionsMarshal.AsArray(inputs)! };
        foreach (var column in inputs)
        {
            given.Add(ImmutableCollectionsMarshal.AsArray(column)!);
        }

        given.Add(ImmutableCollectionsMarshal.AsArray(output)!);
        if (!alsoGiven.IsDefaultOrEmpty)
        {
            given.Add(ImmutableCollectionsMarshal.AsArray(alsoGiven)!);
        }

        var kept = ResultArrayBytes(result, given);
        log.WriteLine($"{result.GetType().Name}: allocated {allocated} B; result arrays {kept} B; budget {kept + SlackBytes} B");
        Assert.True(allocated <= kept + SlackBytes, $"A warmed fit allocated {allocated} bytes; its result keeps {kept} bytes of arrays (+{SlackBytes} slack).");
    }

    /// <summary>Bytes of the distinct arrays the result's public ImmutableArray properties hold (the inputs' outer array too), leaving out those it was given.</summary>
    private static long ResultArrayBytes(object result, HashSet<object> given)
    {
        var seen = new HashSet<object>(ReferenceEqualityComparer.Instance);
        long total = 0;
        foreach (var property in result.GetType().GetProperties(BindingFlags.Public | BindingFlags.Instance))
        {
            var type = property.PropertyType;
            if (!type.IsGenericType || type.GetGenericTypeDefinition() != typeof(ImmutableArray<>) || property.GetIndexParameters().Length != 0)
            {
                continue;
            }

            var value = property.GetValue(result)!;
            var array = (Array?)typeof(ImmutableArray<>).MakeGenericType(type.GetGenericArguments()[0]).GetField("array", BindingFlags.NonPublic | BindingFlags.Instance)!.GetValue(value);
            if (array is null || given.Contains(array) || !seen.Add(array))
            {
                continue;
            }

            var element = type.GetGenericArguments()[0];
            if (element == typeof(string))
            {
                continue; // names: the model's, not the fit's
            }

            var elementSize = element == typeof(bool) ? 1 : element == typeof(ImmutableArray<double>) ? 8 : Marshal.SizeOf(element);
            total += RoundUp(24 + ((long)elementSize * array.Length));
        }

        if (result is FitResult linear)
        {
            // The scaling record's array of (centre, half range) pairs.
            total += RoundUp(24 + (16L * linear.Scaling.Inputs.Length));
        }

        if (result is NonlinearFitResult nonlinear)
        {
            // The status sentence the result keeps (a string: 22 bytes, then 2 per character).
            total += RoundUp(22 + (2L * nonlinear.StatusReason.Length));
        }

        return total;
    }

    private static long RoundUp(long bytes) => (bytes + 7) & ~7L;
}
