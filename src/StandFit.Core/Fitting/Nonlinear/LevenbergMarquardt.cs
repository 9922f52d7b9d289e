using System.Collections.Immutable;
using System.Runtime.InteropServices;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Problems;

namespace StandFit.Core.Fitting.Nonlinear;

/// <summary>
/// Least squares for models nonlinear in their parameters, by a Levenberg-Marquardt search with a
/// trust region on the scaled step (Moré 1978), each step solved by QR of the augmented Jacobian,
/// the Jacobian exact (from <see cref="ModelExpression.EvaluateWithGradient"/>, never by finite
/// differences). Optional bounds are kept by projection onto the box (no change of variables). The
/// search stops on the relative reduction of the RSS, the relative step or the gradient (see
/// <see cref="LevenbergMarquardtOptions"/>), or at the iteration limit; a search that did not
/// converge is reported as such, never as a solution.
/// <para>
/// Memory: the search's buffers (Jacobian, QR, trust-region vectors, covariance intermediates) live
/// in a solver kept by the calling thread and reused by its next fit of the same shape; a fit
/// allocates its <see cref="NonlinearFitResult"/> and the arrays that result keeps.
/// </para>
/// </summary>
public static class LevenbergMarquardt
{
    /// <summary>
    /// A pivot of R (of the Jacobian with unit-norm columns) at or below this times the largest
    /// means the Jacobian is singular at the estimates: condition number about 10^13 or more.
    /// </summary>
    public const double RankTolerance = 1e-13;

    /// <summary>Most Gauss-Newton refinement steps after the search converged, with residuals in double.</summary>
    private const int RefinementSteps = 30;

    /// <summary>Most refinement steps after those, with residuals in double-double.</summary>
    private const int PreciseRefinementSteps = 3;

    /// <summary>
    /// Fits <paramref name="model"/> to the response <paramref name="y"/> from
    /// <paramref name="start"/> (in <see cref="ModelExpression.ParameterNames"/> order).
    /// <paramref name="variables"/> holds one column per <see cref="ModelExpression.VariableNames"/>
    /// entry, each as long as <paramref name="y"/>; all data must be finite (the ingest has already
    /// refused anything else). A problem (too few points for error bars) comes back as a value; a
    /// search that fails to converge is a result whose <see cref="NonlinearFitResult.Status"/> says
    /// so. Wrong shapes, non-finite data or start values, invalid options or a start outside the
    /// bounds are bugs of the caller and throw.
    /// </summary>
    public static Result<NonlinearFitResult> Fit(
        ModelExpression model,
        IReadOnlyList<ImmutableArray<double>> variables,
        ImmutableArray<double> y,
        ImmutableArray<double> start,
        LevenbergMarquardtOptions? options = null,
        string sourceName = "")
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(variables);
        options ??= LevenbergMarquardtOptions.Default;
        var p = model.ParameterCount;
        var v = model.VariableCount;
        CheckShapes(variables, y, start, v, p);
        var n = y.Length;
        var (lower, upper) = CheckOptions(options, start, p);
        if (n <= p)
        {
            return new Problem(ReasonCodes.FitTooFewPoints.Code, Messages.TooFewPoints(n, p), SourceLocation.WholeFile(sourceName));
        }

        // The solver only reads the data: one variable's column and the response are used in place
        // (no copies); several variables are interleaved row by row into the thread's buffer.
        var cache = SolverCache.ForThread();
        double[] flat;
        if (v == 1)
        {
            flat = ImmutableCollectionsMarshal.AsArray(variables[0])!;
        }
        else
        {
            flat = cache.Interleaved(n * v);
            for (var k = 0; k < v; k++)
            {
                var column = variables[k];
                for (var i = 0; i < n; i++)
                {
                    flat[(i * v) + k] = column[i];
                }
            }
        }

        var response = ImmutableCollectionsMarshal.AsArray(y)!;
        var solver = cache.Solver(n, p, model.GradientScratchLength);
        solver.Reset(model, flat, response, options, lower, upper);
        var x = start.ToArray();
        var status = Search(solver, x, lower, upper);

        // Fitted values and residuals at the estimates (the model in double-double, each residual
        // rounded once), and the covariance from a fresh Jacobian there.
        var fitted = new double[n];
        var residuals = new double[n];
        var rss = 0.0;
        var mean = 0.0;
        for (var i = 0; i < n; i++)
        {
            var precise = model.EvaluatePrecise(x, flat.AsSpan(i * v, v));
            fitted[i] = precise.Hi;
            residuals[i] = DoubleDouble.Subtract(y[i], precise);
            rss += residuals[i] * residuals[i];
            mean += y[i];
        }

        mean /= n;
        var tss = 0.0;
        foreach (var value in y)
        {
            tss += (value - mean) * (value - mean);
        }

        var covariance = new double[p * p];
        Array.Fill(covariance, double.NaN);
        var leverage = new double[n];
        Array.Fill(leverage, double.NaN);
        var condition = double.PositiveInfinity;
        // The search is over: its Jacobian buffer and QR workspace serve the covariance.
        var jacobian = solver.JacobianBuffer;
        var design = new double[n * p];
        var finite = status != NonlinearFitStatus.NonFinite && solver.JacobianInto(x, jacobian) && double.IsFinite(rss);
        for (var i = 0; finite && i < n; i++)
        {
            for (var j = 0; j < p; j++)
            {
                design[(i * p) + j] = jacobian[(j * n) + i];
            }
        }

        var hasIntercept = false;
        var fullRank = finite && Covariance(solver, jacobian, n, p, rss / (n - p), covariance, leverage, out condition, out hasIntercept);
        if (status.IsConverged() && !finite)
        {
            status = NonlinearFitStatus.NonFinite;
        }
        else if (status.IsConverged() && !fullRank)
        {
            status = NonlinearFitStatus.SingularJacobian;
        }

        var atBound = new bool[p];
        if (lower is not null)
        {
            for (var j = 0; j < p; j++)
            {
                atBound[j] = x[j] <= lower[j] || x[j] >= upper![j];
            }
        }

        var reason = Reason(status, solver.Iterations, options, condition);
        var inputs = new ImmutableArray<double>[v];
        for (var k = 0; k < v; k++)
        {
            inputs[k] = variables[k];
        }

        return new NonlinearFitResult(
            model,
            ImmutableCollectionsMarshal.AsImmutableArray(inputs),
            start,
            y,
            Wrap(x),
            Wrap(covariance),
            Wrap(fitted),
            Wrap(residuals),
            ImmutableCollectionsMarshal.AsImmutableArray(atBound),
            Wrap(design),
            Wrap(leverage),
            hasIntercept,
            rss,
            tss,
            condition,
            solver.Iterations,
            solver.Evaluations,
            status,
            reason);
    }

    /// <summary>
    /// s^2 (J'J)^-1 into <paramref name="covariance"/> (p x p row-major) through the pivoted QR of J
    /// with unit-norm columns, J C^-1 P = Q R: (J'J)^-1 = C^-1 P R^-1 R^-T P' C^-1. False when J is
    /// singular (a zero column or a pivot at or below <see cref="RankTolerance"/> of the largest).
    /// </summary>
    private static bool Covariance(LevenbergMarquardtSolver solver, double[] jacobian, int n, int p, double s2, double[] covariance, double[] leverage, out double condition, out bool hasIntercept)
    {
        condition = double.PositiveInfinity;
        hasIntercept = false;
        var qr = solver.Qr;
        var scale = solver.CovarianceScale;
        for (var j = 0; j < p; j++)
        {
            var column = jacobian.AsSpan(j * n, n);
            scale[j] = VectorNorm.Of(column);
            if (scale[j] == 0.0)
            {
                return false;
            }

            for (var i = 0; i < n; i++)
            {
                column[i] /= scale[j];
            }
        }

        qr.Factor(jacobian);
        var r = solver.CovarianceR;
        qr.CopyR(r);
        condition = SingularValues.ConditionNumber(r, p, solver.CovarianceScratch);
        var largest = Math.Abs(r[0]);
        for (var k = 0; k < p; k++)
        {
            if (!(Math.Abs(r[(k * p) + k]) > RankTolerance * largest))
            {
                return false;
            }
        }

        // R^-1, upper triangular, row-major.
        var inverse = solver.CovarianceInverse;
        Array.Clear(inverse);
        for (var column = 0; column < p; column++)
        {
            for (var i = column; i >= 0; i--)
            {
                var sum = i == column ? 1.0 : 0.0;
                for (var j = i + 1; j <= column; j++)
                {
                    sum -= r[(i * p) + j] * inverse[(j * p) + column];
                }

                inverse[(i * p) + column] = sum / r[(i * p) + i];
            }
        }

        for (var k = 0; k < p; k++)
        {
            for (var l = 0; l < p; l++)
            {
                var sum = 0.0;
                for (var m = Math.Max(k, l); m < p; m++)
                {
                    sum += inverse[(k * p) + m] * inverse[(l * p) + m];
                }

                var jk = qr.Permutation(k);
                var jl = qr.Permutation(l);
                covariance[(jk * p) + jl] = s2 * sum / (scale[jk] * scale[jl]);
            }
        }

        // Leverage h_i = ||R^-T P' j_i||^2 (j_i the scaled Jacobian's row i), and the projection of
        // the constant vector on the Jacobian's column space, ||R^-T P' J' 1||^2, against n.
        Span<double> w = p <= 64 ? stackalloc double[p] : new double[p];
        Span<double> u = p <= 64 ? stackalloc double[p] : new double[p];
        u.Clear();
        for (var i = 0; i < n; i++)
        {
            var h = 0.0;
            for (var k = 0; k < p; k++)
            {
                var sum = 0.0;
                for (var m = 0; m <= k; m++)
                {
                    sum += jacobian[(qr.Permutation(m) * n) + i] * inverse[(m * p) + k];
                }

                h += sum * sum;
                u[k] += sum;
            }

            leverage[i] = h;
        }

        var projected = 0.0;
        foreach (var value in u)
        {
            projected += value * value;
        }

        hasIntercept = n - projected <= 1e-9 * n;
        return true;
    }

    private static string Reason(NonlinearFitStatus status, int iterations, LevenbergMarquardtOptions options, double condition) => status switch
    {
        NonlinearFitStatus.ConvergedRss => Messages.NonlinearConvergedRss(iterations, options.RssTolerance),
        NonlinearFitStatus.ConvergedStep => Messages.NonlinearConvergedStep(iterations, options.StepTolerance),
        NonlinearFitStatus.ConvergedGradient => Messages.NonlinearConvergedGradient(iterations, options.GradientTolerance),
        NonlinearFitStatus.MaxIterations => Messages.NonlinearMaxIterations(options.MaxIterations),
        NonlinearFitStatus.NonFinite => Messages.NonlinearNonFinite(iterations),
        _ => Messages.NonlinearSingularJacobian(iterations, condition),
    };

    private static void CheckShapes(IReadOnlyList<ImmutableArray<double>> variables, ImmutableArray<double> y, ImmutableArray<double> start, int v, int p)
    {
        if (variables.Count != v)
        {
            throw new ArgumentException("One column is needed per variable of the model.", nameof(variables));
        }

        if (y.IsDefault || !AllFinite(y.AsSpan()))
        {
            throw new ArgumentException("The response must be given and finite.", nameof(y));
        }

        foreach (var column in variables)
        {
            if (column.IsDefault || column.Length != y.Length || !AllFinite(column.AsSpan()))
            {
                throw new ArgumentException("Every variable column must be finite and as long as the response.", nameof(variables));
            }
        }

        if (start.IsDefault || start.Length != p || !AllFinite(start.AsSpan()))
        {
            throw new ArgumentException("The start vector needs one finite value per parameter.", nameof(start));
        }
    }

    private static (double[]? Lower, double[]? Upper) CheckOptions(LevenbergMarquardtOptions options, ImmutableArray<double> start, int p)
    {
        if (options.MaxIterations < 1)
        {
            throw new ArgumentException("MaxIterations must be 1 or more.", nameof(options));
        }

        if (!ValidTolerance(options.RssTolerance) || !ValidTolerance(options.StepTolerance) || !ValidTolerance(options.GradientTolerance))
        {
            throw new ArgumentException("Tolerances must be finite and 0 or more.", nameof(options));
        }

        if (!(options.InitialStepFactor > 0) || !double.IsFinite(options.InitialStepFactor))
        {
            throw new ArgumentException("InitialStepFactor must be positive and finite.", nameof(options));
        }

        if (options.LowerBounds.IsDefault && options.UpperBounds.IsDefault)
        {
            return (null, null);
        }

        // The solver only reads the bounds: the options' own arrays are used in place.
        var lower = options.LowerBounds.IsDefault ? Enumerable.Repeat(double.NegativeInfinity, p).ToArray() : ImmutableCollectionsMarshal.AsArray(options.LowerBounds)!;
        var upper = options.UpperBounds.IsDefault ? Enumerable.Repeat(double.PositiveInfinity, p).ToArray() : ImmutableCollectionsMarshal.AsArray(options.UpperBounds)!;
        if (lower.Length != p || upper.Length != p)
        {
            throw new ArgumentException("Bounds need one value per parameter.", nameof(options));
        }

        for (var j = 0; j < p; j++)
        {
            if (double.IsNaN(lower[j]) || double.IsNaN(upper[j]) || lower[j] > upper[j] || lower[j] == double.PositiveInfinity || upper[j] == double.NegativeInfinity)
            {
                throw new ArgumentException("Each lower bound must be at most its upper bound, and neither NaN.", nameof(options));
            }

            if (start[j] < lower[j] || start[j] > upper[j])
            {
                throw new ArgumentException("The start vector must lie within the bounds.", nameof(start));
            }
        }

        return (lower, upper);
    }

    private static bool ValidTolerance(double tolerance) => tolerance >= 0 && double.IsFinite(tolerance);

    /// <summary>
    /// The search from <paramref name="x"/> (overwritten with its end point) and, when it converged
    /// inside the bounds, the Gauss-Newton refinement: the estimates of a fit, without its result.
    /// </summary>
    internal static NonlinearFitStatus Search(LevenbergMarquardtSolver solver, double[] x, double[]? lower, double[]? upper)
    {
        var status = solver.Run(x);
        if (status.IsConverged() && (lower is null || !OnABound(x, lower, upper!)))
        {
            solver.Refine(x, RefinementSteps, precise: false);
            solver.Refine(x, PreciseRefinementSteps, precise: true);
        }

        return status;
    }

    /// <summary>Checks the options and gives the bounds as the solver reads them (null, null when unbounded).</summary>
    internal static (double[]? Lower, double[]? Upper) Bounds(LevenbergMarquardtOptions options, ImmutableArray<double> start, int p) => CheckOptions(options, start, p);

    private static bool OnABound(double[] x, double[] lower, double[] upper)
    {
        for (var j = 0; j < x.Length; j++)
        {
            if (x[j] <= lower[j] || x[j] >= upper[j])
            {
                return true;
            }
        }

        return false;
    }

    private static bool AllFinite(ReadOnlySpan<double> values)
    {
        foreach (var value in values)
        {
            if (!double.IsFinite(value))
            {
                return false;
            }
        }

        return true;
    }

    private static ImmutableArray<double> Wrap(double[] values) => ImmutableCollectionsMarshal.AsImmutableArray(values);

    /// <summary>One thread's solver (replaced when a fit of another shape comes) and its buffer for interleaved variables.</summary>
    private sealed class SolverCache
    {
        [ThreadStatic]
        private static SolverCache? t_current;

        private LevenbergMarquardtSolver? _solver;
        private double[] _interleaved = [];

        public static SolverCache ForThread() => t_current ??= new SolverCache();

        public LevenbergMarquardtSolver Solver(int n, int p, int scratchLength)
        {
            if (_solver is null || _solver.Points != n || _solver.ParameterCount != p)
            {
                _solver = new LevenbergMarquardtSolver(n, p, scratchLength);
            }

            return _solver;
        }

        public double[] Interleaved(int length)
        {
            if (_interleaved.Length < length)
            {
                _interleaved = new double[length];
            }

            return _interleaved;
        }
    }
}
