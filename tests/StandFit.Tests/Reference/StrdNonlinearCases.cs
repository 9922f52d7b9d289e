using System.Collections.Concurrent;
using System.Collections.Immutable;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;
using StandFit.Tests.Support;

namespace StandFit.Tests.Reference;

/// <summary>
/// One NIST StRD nonlinear dataset as StandFit fits it: the file, the model as the file's "Model:"
/// section writes it (in the expression language: NIST's square brackets and ** are part of the
/// language), the stimulus variables, and whether the model is for ln(y) (Nelson).
/// </summary>
public sealed record StrdNonlinearCase(string File, string Expression, ImmutableArray<string> Variables, bool LogResponse = false)
{
    public string Name => Path.GetFileNameWithoutExtension(File);

    public StrdNonlinearFile Dataset => StrdNonlinearFile.Load(File);

    /// <summary>The model compiled with the file's parameters b1, b2 ... in the file's order.</summary>
    public ModelExpression Model
    {
        get
        {
            var parsed = ExpressionParser.Parse(Expression, Variables, [.. Dataset.Parameters.Select(p => p.Name)]);
            return parsed.IsSuccess ? parsed.Expression : throw new InvalidOperationException(File + ": " + parsed.Error);
        }
    }

    /// <summary>The response the model describes: y, or ln(y) for a model of log[y].</summary>
    public ImmutableArray<double> Response => LogResponse ? [.. Dataset.Y.Select(Math.Log)] : Dataset.Y;
}

/// <summary>
/// The 27 StRD nonlinear datasets in the order of the README's table (lower, average, higher
/// difficulty), and their fits from Start 1 and Start 2 with the default options, made once per
/// test run and shared by the contract tests and the accuracy table.
/// </summary>
public static class StrdNonlinearCases
{
    private static readonly ImmutableArray<string> X = ["x"];
    private static readonly ConcurrentDictionary<(string, int), Lazy<NonlinearFitResult>> Fits = new();

    // Models from each file's "Model:" section (NIST StRD, nonlinear regression).
    public static StrdNonlinearCase Misra1a { get; } = new("Misra1a.dat", "b1*(1-exp[-b2*x])", X);
    public static StrdNonlinearCase Chwirut2 { get; } = new("Chwirut2.dat", "exp(-b1*x)/(b2+b3*x)", X);
    public static StrdNonlinearCase Chwirut1 { get; } = new("Chwirut1.dat", "exp[-b1*x]/(b2+b3*x)", X);
    public static StrdNonlinearCase Lanczos3 { get; } = new("Lanczos3.dat", "b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)", X);
    public static StrdNonlinearCase Gauss1 { get; } = new("Gauss1.dat", "b1*exp( -b2*x ) + b3*exp( -(x-b4)**2 / b5**2 ) + b6*exp( -(x-b7)**2 / b8**2 )", X);
    public static StrdNonlinearCase Gauss2 { get; } = new("Gauss2.dat", "b1*exp( -b2*x ) + b3*exp( -(x-b4)**2 / b5**2 ) + b6*exp( -(x-b7)**2 / b8**2 )", X);
    public static StrdNonlinearCase DanWood { get; } = new("DanWood.dat", "b1*x**b2", X);
    public static StrdNonlinearCase Misra1b { get; } = new("Misra1b.dat", "b1 * (1-(1+b2*x/2)**(-2))", X);
    public static StrdNonlinearCase Kirby2 { get; } = new("Kirby2.dat", "(b1 + b2*x + b3*x**2) / (1 + b4*x + b5*x**2)", X);
    public static StrdNonlinearCase Hahn1 { get; } = new("Hahn1.dat", "(b1+b2*x+b3*x**2+b4*x**3) / (1+b5*x+b6*x**2+b7*x**3)", X);
    public static StrdNonlinearCase Nelson { get; } = new("Nelson.dat", "b1 - b2*x1 * exp[-b3*x2]", ["x1", "x2"], LogResponse: true);
    public static StrdNonlinearCase Mgh17 { get; } = new("MGH17.dat", "b1 + b2*exp[-x*b4] + b3*exp[-x*b5]", X);
    public static StrdNonlinearCase Lanczos1 { get; } = new("Lanczos1.dat", "b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)", X);
    public static StrdNonlinearCase Lanczos2 { get; } = new("Lanczos2.dat", "b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)", X);
    public static StrdNonlinearCase Gauss3 { get; } = new("Gauss3.dat", "b1*exp( -b2*x ) + b3*exp( -(x-b4)**2 / b5**2 ) + b6*exp( -(x-b7)**2 / b8**2 )", X);
    public static StrdNonlinearCase Misra1c { get; } = new("Misra1c.dat", "b1 * (1-(1+2*b2*x)**(-.5))", X);
    public static StrdNonlinearCase Misra1d { get; } = new("Misra1d.dat", "b1*b2*x*((1+b2*x)**(-1))", X);
    public static StrdNonlinearCase Roszman1 { get; } = new("Roszman1.dat", "b1 - b2*x - arctan[b3/(x-b4)]/pi", X);
    public static StrdNonlinearCase Enso { get; } = new(
        "ENSO.dat",
        """
        b1 + b2*cos( 2*pi*x/12 ) + b3*sin( 2*pi*x/12 )
           + b5*cos( 2*pi*x/b4 ) + b6*sin( 2*pi*x/b4 )
           + b8*cos( 2*pi*x/b7 ) + b9*sin( 2*pi*x/b7 )
        """,
        X);
    public static StrdNonlinearCase Mgh09 { get; } = new("MGH09.dat", "b1*(x**2+x*b2) / (x**2+x*b3+b4)", X);
    public static StrdNonlinearCase Thurber { get; } = new("Thurber.dat", "(b1 + b2*x + b3*x**2 + b4*x**3) / (1 + b5*x + b6*x**2 + b7*x**3)", X);
    public static StrdNonlinearCase BoxBod { get; } = new("BoxBOD.dat", "b1*(1-exp[-b2*x])", X);
    public static StrdNonlinearCase Rat42 { get; } = new("Rat42.dat", "b1 / (1+exp[b2-b3*x])", X);
    public static StrdNonlinearCase Mgh10 { get; } = new("MGH10.dat", "b1 * exp[b2/(x+b3)]", X);
    public static StrdNonlinearCase Eckerle4 { get; } = new("Eckerle4.dat", "(b1/b2) * exp[-0.5*((x-b3)/b2)**2]", X);
    public static StrdNonlinearCase Rat43 { get; } = new("Rat43.dat", "b1 / ((1+exp[b2-b3*x])**(1/b4))", X);
    public static StrdNonlinearCase Bennett5 { get; } = new("Bennett5.dat", "b1 * (b2+x)**(-1/b3)", X);

    public static ImmutableArray<StrdNonlinearCase> All { get; } =
    [
        Misra1a, Chwirut2, Chwirut1, Lanczos3, Gauss1, Gauss2, DanWood, Misra1b,
        Kirby2, Hahn1, Nelson, Mgh17, Lanczos1, Lanczos2, Gauss3, Misra1c, Misra1d, Roszman1, Enso,
        Mgh09, Thurber, BoxBod, Rat42, Mgh10, Eckerle4, Rat43, Bennett5,
    ];

    /// <summary>The fit of <paramref name="dataset"/> from NIST's Start 1 or Start 2 with the default options (made once).</summary>
    public static NonlinearFitResult FitFrom(StrdNonlinearCase dataset, int start) =>
        Fits.GetOrAdd((dataset.File, start), key => new Lazy<NonlinearFitResult>(() =>
        {
            var result = LevenbergMarquardt.Fit(dataset.Model, dataset.Dataset.Predictors, dataset.Response, dataset.Dataset.Start(start), sourceName: dataset.File);
            return result.IsSuccess ? result.Value : throw new InvalidOperationException(dataset.File + ": " + string.Join("; ", result.Problems));
        })).Value;
}
