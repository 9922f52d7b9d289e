using System.Collections.Immutable;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting.Expressions;
using StandFit.Core.Fitting.Nonlinear;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>
/// Jackknife and bootstrap refits of an expression model (nonlinear in its parameters): every
/// resample is a least-squares problem of its own, solved from the full-data estimate theta_hat.
/// A resample gives point i a weight w_i (its count in a pairs resample, 0 or 1 in a jackknife, 1
/// in a residual or wild resample) and a response y*_i (the reading, or for the residual and wild
/// schemes f(x_i, theta_hat) + e*_i), and minimises sum_i w_i (y*_i - f(x_i, theta))^2.
/// <para>
/// The search. From theta_hat, Levenberg-Marquardt takes Gauss-Newton steps for as long as they
/// are accepted inside its trust region, and a resample's solution lies close to theta_hat, so
/// each refit first takes those steps directly: the step solves min ||W^1/2 (r - J d)|| by the
/// pivoted Householder QR of W^1/2 J with unit-norm columns (never J'WJ). The first step needs no
/// evaluation: J and the residuals at theta_hat are the fit's own. A step is kept while the
/// weighted RSS does not grow, the point stays inside the recipe's bounds and the steps shrink (each
/// at most 0.9 of the one before); the refit has converged when the scaled step still to come is at
/// most the recipe's step tolerance times the scaled parameters, ||D d|| &lt;= tol ||D theta|| (the
/// search's own converged-step test, with D the column norms of the fit's Jacobian), what is still
/// to come estimated from the third step on as ||D d|| rho / (1 - rho), rho the ratio of the last
/// two steps. The model and its Jacobian at a resample's points are evaluated in one pass over the
/// program (<see cref="ModelExpression.EvaluateWithGradientBatch"/>). Anything else (a step that does not shrink, the RSS
/// growing, a bound, a singular W^1/2 J, a non-finite value, 16 steps) hands the resample to the
/// full Levenberg-Marquardt search (<see cref="LevenbergMarquardt"/>), from theta_hat on the
/// resample's own rows (point i repeated w_i times), with the recipe's iteration limit and bounds;
/// its verdict is final.
/// </para>
/// <para>
/// A resample fails, is counted by cause and is left out of every figure when: its points hold one
/// set point (<see cref="ResampleFailure.DegenerateStimulus"/>) or fewer distinct set points than
/// parameters, or its Jacobian at the solution is singular (<see cref="ResampleFailure.RankDeficient"/>);
/// the search reaches the iteration limit (<see cref="ResampleFailure.NotConverged"/>); a value is
/// not finite (<see cref="ResampleFailure.NonFinite"/>); the solution lies on a bound
/// (<see cref="ResampleFailure.AtBound"/>). Never replaced by another draw.
/// </para>
/// <para>
/// The figures of a resample are its parameters and, from the refitted curve, each derived figure
/// that is a function of the parameters alone: sensitivity_at (the expression's symbolic
/// derivative), value_at and band_at (the curve's value), and inverse_at (the root of the refitted
/// curve, <see cref="NonlinearInverse"/>; a refit whose curve does not reach the output exactly once
/// in the calibrated range fails as <see cref="ResampleFailure.NoRootInRange"/> or
/// <see cref="ResampleFailure.SeveralRoots"/>). The leverage of the residual and wild
/// schemes is the tangent-plane leverage of the fit. The draws are those of
/// <see cref="LinearResampler"/> (the same indices and weights from the same stream). Every buffer
/// is allocated by the constructor; a resample allocates nothing, except that the first hand-over
/// to the full search for a given number of rows allocates that search's solver, kept for the next.
/// </para>
/// </summary>
public sealed class NonlinearResampler : IResampler
{
    /// <summary>Most Gauss-Newton steps of a refit before it is handed to the full search.</summary>
    public const int MaxDirectSteps = 16;

    /// <summary>Each kept Gauss-Newton step must be at most this fraction of the one before.</summary>
    public const double Contraction = 0.9;

    private const double Epsilon = 2.220446049250313E-16;

    private readonly ModelExpression _model;
    private readonly ModelExpression? _slope;
    private readonly LevenbergMarquardtOptions _options;
    private readonly double[]? _lower;
    private readonly double[]? _upper;
    private readonly int _n;
    private readonly int _p;
    private readonly int _v;
    private readonly int _f;
    private readonly double[] _variables;   // n x v row-major
    private readonly double[] _y;
    private readonly double[] _fitted;
    private readonly double[] _residuals;
    private readonly double[] _adjusted;
    private readonly double[] _centred;
    private readonly double[] _jacobian0;   // n x p row-major: the fit's Jacobian at theta_hat
    private readonly double[] _theta0;
    private readonly double[] _diag;        // column norms of the fit's Jacobian (1 for a zero column)
    private readonly DerivedKind[] _derivedKinds;
    private readonly int[] _inverseSlots;   // the figure index of each inverse_at figure
    private readonly double[] _inverseValues;
    private readonly NonlinearInverse? _inverse;
    private readonly double[] _derivedAt;
    private readonly double[] _estimates;
    private readonly int[] _setOf;          // each point's set point (distinct input row), 0 .. sets - 1
    private readonly double _stepTolerance;

    // The unweighted problem at theta_hat, factorised once (the residual and wild schemes' first step).
    private readonly ReusableQr _qr0;
    private readonly double[] _norm0;
    private readonly bool _qr0FullRank;

    // Workspaces of one refit.
    private readonly ReusableQr?[] _qrs;    // by the number of rows of positive weight
    private readonly double[] _a;           // rows x p column-major: W^1/2 J on the rows of positive weight, columns scaled to unit norm
    private readonly double[] _b;           // rows: W^1/2 (y* - f)
    private readonly double[] _qtb;
    private readonly double[] _columnNorm;
    private readonly double[] _theta;
    private readonly double[] _trial;
    private readonly double[] _step;
    private readonly double[] _z;
    private readonly double[] _gradient;
    private readonly double[] _scratch;
    private readonly double[] _batchScratch;
    private readonly double[] _values;
    private readonly double[] _point;
    private readonly double[] _weights;
    private readonly int[] _active;         // the points of positive weight, in order
    private readonly double[] _rowRoot;     // sqrt of each active point's weight
    private readonly double[] _start;       // residuals at theta_hat of the resample (e or e*)
    private readonly double[] _response;
    private readonly double[] _figures;
    private readonly int[] _mark;
    private readonly int[] _drawn;
    private readonly double[] _errors;
    private readonly Dictionary<int, FullSearch> _searches = [];
    private int _stamp;
    private int _rows;

    /// <param name="fit">The converged fit on the original data (not on a bound).</param>
    /// <param name="model">The recipe's expression model (its iteration limit, tolerances and bounds).</param>
    /// <param name="derived">
    /// The derived figures to resample besides the parameters, of a model of one input: sensitivity_at,
    /// value_at, band_at, and inverse_at (the root of each refitted curve, <see cref="NonlinearInverse"/>;
    /// each must be solved on the fit, <see cref="Curve.InversePrediction.RootOf"/>).
    /// </param>
    public NonlinearResampler(NonlinearFitResult fit, ExpressionModel model, ImmutableArray<DerivedFigure> derived)
    {
        ArgumentNullException.ThrowIfNull(fit);
        ArgumentNullException.ThrowIfNull(model);
        if (!fit.Converged)
        {
            throw new ArgumentException("Only a converged fit is resampled.", nameof(fit));
        }

        if (!ReferenceEquals(fit.Model, model.Expression))
        {
            throw new ArgumentException("The fit is not of this model.", nameof(model));
        }

        derived = derived.IsDefault ? [] : derived;
        if (derived.Length > 0 && fit.InputCount != 1)
        {
            throw new ArgumentException("Derived figures are resampled for a model of one input.", nameof(derived));
        }

        _model = model.Expression;
        _options = model.Options;
        (_lower, _upper) = LevenbergMarquardt.Bounds(_options, fit.Estimates, fit.ParameterCount);
        _n = fit.Count;
        _p = fit.ParameterCount;
        _v = fit.InputCount;
        _f = _p + derived.Length;
        _stepTolerance = Math.Max(_options.StepTolerance, Epsilon);
        _variables = new double[_n * _v];
        for (var k = 0; k < _v; k++)
        {
            for (var i = 0; i < _n; i++)
            {
                _variables[(i * _v) + k] = fit.Inputs[k][i];
            }
        }

        _y = fit.Output.ToArray();
        _fitted = fit.Fitted.ToArray();
        _residuals = fit.Residuals.ToArray();
        _jacobian0 = fit.Jacobian.ToArray();
        _theta0 = fit.Estimates.ToArray();
        _adjusted = new double[_n];
        _centred = new double[_n];
        ResampleDraws.Adjust(_residuals, fit.Leverage.AsSpan(), _adjusted, _centred);
        _diag = new double[_p];
        for (var j = 0; j < _p; j++)
        {
            var sum = 0.0;
            for (var i = 0; i < _n; i++)
            {
                sum += _jacobian0[(i * _p) + j] * _jacobian0[(i * _p) + j];
            }

            _diag[j] = sum > 0 ? Math.Sqrt(sum) : 1.0;
        }

        (_setOf, var sets) = SetPoints(_variables, _n, _v);
        _mark = new int[sets];

        _derivedKinds = [.. derived.Select(d => d.Kind)];
        _derivedAt = [.. derived.Select(d => d.At)];
        _inverseSlots = [.. Enumerable.Range(0, derived.Length).Where(d => derived[d].Kind == DerivedKind.InverseAt).Select(d => _p + d)];
        _inverseValues = new double[_inverseSlots.Length];
        if (_inverseSlots.Length > 0)
        {
            _inverse = new NonlinearInverse(_model, _theta0, fit.InputMin[0], fit.InputMax[0], [.. _inverseSlots.Select(slot => _derivedAt[slot - _p])]);
        }

        _slope = _derivedKinds.Contains(DerivedKind.SensitivityAt) ? _model.InputDerivative(0) : null;
        var scratchLength = Math.Max(_model.GradientScratchLength, _slope?.GradientScratchLength ?? 0);

        _qrs = new ReusableQr?[_n + 1];
        _qr0 = new ReusableQr(_n, _p);
        _a = new double[_n * _p];
        _b = new double[_n];
        _qtb = new double[_n];
        _columnNorm = new double[_p];
        _norm0 = new double[_p];
        _theta = new double[_p];
        _trial = new double[_p];
        _step = new double[_p];
        _z = new double[_p];
        _gradient = new double[_p];
        _scratch = new double[scratchLength];
        _batchScratch = new double[_model.BatchScratchLength(_n)];
        _values = new double[_n];
        _point = new double[Math.Max(_v, 1)];
        _weights = new double[_n];
        _active = new int[_n];
        _rowRoot = new double[_n];
        _start = new double[_n];
        _response = new double[_n];
        _figures = new double[_f];
        _drawn = new int[_n];
        _errors = new double[_n];

        // The unweighted Jacobian at theta_hat, factorised once.
        for (var i = 0; i < _n; i++)
        {
            for (var j = 0; j < _p; j++)
            {
                _a[(j * _n) + i] = _jacobian0[(i * _p) + j];
            }
        }

        _qr0FullRank = ScaleAndFactor(_n, _qr0, _norm0);

        _estimates = new double[_f];
        if (FiguresAt(_theta0, _estimates) != ResampleFailure.None)
        {
            throw new ArgumentException("A derived figure is not finite on the fitted curve.", nameof(derived));
        }

        // An inverse figure's estimate is its root as the full-data figure finds it (from the middle of its step).
        for (var d = 0; d < _inverseSlots.Length; d++)
        {
            _estimates[_inverseSlots[d]] = _inverse!.Estimate(d);
        }
    }

    public int Points => _n;

    public int Parameters => _p;

    public int Figures => _f;

    /// <summary>The figures on the original data: the parameters, then the derived figures.</summary>
    public ReadOnlySpan<double> Estimates => _estimates;

    /// <summary>The leverage-adjusted residuals e_i / sqrt(1 - h_ii) (tangent-plane leverage; 0 for a point of leverage 1), before centring.</summary>
    public ReadOnlySpan<double> AdjustedResiduals => _adjusted;

    /// <summary>Refits that the direct Gauss-Newton steps did not finish and the full search took over, since construction.</summary>
    public int HandedOver { get; private set; }

    /// <summary>
    /// The figures with each group left out in turn: <paramref name="groupOf"/> gives each point's
    /// group (0 .. groups - 1; for delete-one, the point's own index). Figure k of leave-out g goes
    /// to <c>output[k * groups + g]</c> (NaN when it failed) and the cause of a failure to <c>failures[g]</c>.
    /// </summary>
    public void LeaveOut(ReadOnlySpan<int> groupOf, int groups, Span<double> output, Span<ResampleFailure> failures)
    {
        if (groupOf.Length != _n || output.Length < _f * groups || failures.Length < groups)
        {
            throw new ArgumentException("Leave-out buffers do not match the fit.");
        }

        _residuals.CopyTo(_start, 0);
        _y.CopyTo(_response, 0);
        for (var g = 0; g < groups; g++)
        {
            for (var i = 0; i < _n; i++)
            {
                _weights[i] = groupOf[i] != g ? 1.0 : 0.0;
            }

            var failure = Refit(unitWeights: false);
            failures[g] = failure;
            for (var k = 0; k < _f; k++)
            {
                output[(k * groups) + g] = failure == ResampleFailure.None ? _figures[k] : double.NaN;
            }
        }
    }

    /// <summary>
    /// Draws <paramref name="resamples"/> bootstrap resamples of the chosen scheme from
    /// <paramref name="rng"/> (the same draws as <see cref="LinearResampler.Bootstrap"/>) and refits
    /// each. Figure k of the s-th successful resample goes to <c>output[k * resamples + s]</c>;
    /// failed resamples are counted by cause, not written. When <paramref name="recordIndices"/> is
    /// not empty (resamples x n), the drawn point indices (pairs) or residual indices (residual) are
    /// written there, one resample per row.
    /// </summary>
    public BootstrapCounts Bootstrap(BootstrapScheme scheme, int resamples, ref Xoshiro256StarStar rng, Span<double> output, Span<int> recordIndices = default)
    {
        ResampleDraws.CheckBootstrapBuffers(_f, _n, resamples, output, recordIndices);

        var threshold = Xoshiro256StarStar.RejectionThreshold(_n);
        int good = 0, degenerate = 0, deficient = 0, nonFinite = 0, notConverged = 0, atBound = 0, noRoot = 0, severalRoots = 0;
        if (scheme == BootstrapScheme.Pairs)
        {
            _residuals.CopyTo(_start, 0);
            _y.CopyTo(_response, 0);
        }
        else
        {
            Array.Fill(_weights, 1.0);
        }

        for (var r = 0; r < resamples; r++)
        {
            ResampleFailure failure;
            if (scheme == BootstrapScheme.Pairs)
            {
                rng.FillBelow(_drawn, (uint)_n, threshold);
                Array.Clear(_weights);
                foreach (var i in _drawn)
                {
                    _weights[i] += 1.0;
                }

                failure = Refit(unitWeights: false);
            }
            else
            {
                ResampleDraws.Errors(scheme, ref rng, _adjusted, _centred, threshold, _drawn, _errors);
                for (var i = 0; i < _n; i++)
                {
                    _start[i] = _errors[i];
                    _response[i] = _fitted[i] + _errors[i];
                }

                failure = Refit(unitWeights: true);
            }

            if (!recordIndices.IsEmpty && scheme is BootstrapScheme.Pairs or BootstrapScheme.Residual)
            {
                _drawn.CopyTo(recordIndices.Slice(r * _n, _n));
            }

            switch (failure)
            {
                case ResampleFailure.None:
                    for (var k = 0; k < _f; k++)
                    {
                        output[(k * resamples) + good] = _figures[k];
                    }

                    good++;
                    break;
                case ResampleFailure.DegenerateStimulus:
                    degenerate++;
                    break;
                case ResampleFailure.RankDeficient:
                    deficient++;
                    break;
                case ResampleFailure.NotConverged:
                    notConverged++;
                    break;
                case ResampleFailure.AtBound:
                    atBound++;
                    break;
                case ResampleFailure.NoRootInRange:
                    noRoot++;
                    break;
                case ResampleFailure.SeveralRoots:
                    severalRoots++;
                    break;
                default:
                    nonFinite++;
                    break;
            }
        }

        return new BootstrapCounts(resamples, good, degenerate, deficient, nonFinite, notConverged, atBound, noRoot, severalRoots);
    }

    /// <summary>
    /// Refits the resample held in <see cref="_weights"/>, <see cref="_start"/> (its residuals at
    /// theta_hat) and <see cref="_response"/>; on success the figures are in <see cref="_figures"/>.
    /// </summary>
    private ResampleFailure Refit(bool unitWeights)
    {
        if (unitWeights)
        {
            _rows = _n;
            for (var i = 0; i < _n; i++)
            {
                _active[i] = i;
                _rowRoot[i] = 1.0;
            }
        }
        else
        {
            var sets = DistinctSetPoints();
            if (sets <= 1)
            {
                return ResampleFailure.DegenerateStimulus;
            }

            if (sets < _p)
            {
                return ResampleFailure.RankDeficient;
            }

            _rows = 0;
            for (var i = 0; i < _n; i++)
            {
                if (_weights[i] > 0)
                {
                    _active[_rows] = i;
                    _rowRoot[_rows] = Math.Sqrt(_weights[i]);
                    _rows++;
                }
            }
        }

        var failure = Direct(unitWeights) ? ResampleFailure.None : Search();
        return failure == ResampleFailure.None ? FiguresAt(_theta, _figures) : failure;
    }

    /// <summary>
    /// Gauss-Newton steps from theta_hat on the resample's points of positive weight (the rows of
    /// <see cref="_active"/>); true when they converged (the estimates in <see cref="_theta"/>),
    /// false to hand the resample over to the full search.
    /// </summary>
    private bool Direct(bool unitWeights)
    {
        var m = _rows;
        _theta0.CopyTo(_theta, 0);
        var rss = 0.0;
        for (var r = 0; r < m; r++)
        {
            var b = _rowRoot[r] * _start[_active[r]];
            _b[r] = b;
            rss += b * b;
        }

        ReusableQr qr;
        double[] norms;
        if (unitWeights)
        {
            if (!_qr0FullRank)
            {
                return false;
            }

            qr = _qr0;
            norms = _norm0;
        }
        else
        {
            qr = QrOf(m);
            norms = _columnNorm;
            for (var r = 0; r < m; r++)
            {
                var row = _jacobian0.AsSpan(_active[r] * _p, _p);
                for (var j = 0; j < _p; j++)
                {
                    _a[(j * m) + r] = _rowRoot[r] * row[j];
                }
            }

            if (!ScaleAndFactor(m, qr, norms))
            {
                return false;
            }
        }

        var previous = double.PositiveInfinity;
        for (var step = 0; step < MaxDirectSteps; step++)
        {
            // The Gauss-Newton step: R z = (Q' b)[0..p), d = P C^-1 z.
            var qtb = _qtb.AsSpan(0, m);
            _b.AsSpan(0, m).CopyTo(qtb);
            qr.ApplyQTranspose(qtb);
            for (var k = _p - 1; k >= 0; k--)
            {
                var sum = qtb[k];
                for (var j = k + 1; j < _p; j++)
                {
                    sum -= qr.R(k, j) * _z[j];
                }

                _z[k] = sum / qr.R(k, k);
            }

            double size = 0, xnorm = 0;
            for (var k = 0; k < _p; k++)
            {
                var j = qr.Permutation(k);
                _step[j] = _z[k] / norms[j];
            }

            for (var j = 0; j < _p; j++)
            {
                _trial[j] = _theta[j] + _step[j];
                size += _diag[j] * _step[j] * _diag[j] * _step[j];
                xnorm += _diag[j] * _trial[j] * _diag[j] * _trial[j];
                if (!double.IsFinite(_trial[j]) || (_lower is not null && (_trial[j] <= _lower[j] || _trial[j] >= _upper![j])))
                {
                    return false;
                }
            }

            size = Math.Sqrt(size);
            if (size > Contraction * previous)
            {
                return false;
            }

            // Converged when this step, or what the steps still to come would add (at most
            // size rho / (1 - rho) for steps that shrink by the ratio rho of the last two, which
            // overstates it once the steps shrink quadratically), is within the step tolerance.
            // The ratio of the first two steps is not used: the first, from theta_hat, is large
            // and shrinks quadratically, while the steps after it shrink at Gauss-Newton's linear
            // rate (the residuals times the curvature), which only the later ratios show.
            var remaining = size;
            if (step > 1)
            {
                var rate = size / previous;
                remaining = Math.Min(size, size * rate / (1.0 - rate));
            }

            if (remaining <= _stepTolerance * Math.Sqrt(xnorm))
            {
                _trial.CopyTo(_theta, 0);
                return true;
            }

            // The weighted residuals and Jacobian at the trial point (the program run once over the rows).
            _model.EvaluateWithGradientBatch(_trial, _variables, _active.AsSpan(0, m), _values, _a, _batchScratch);
            var rssTrial = 0.0;
            for (var r = 0; r < m; r++)
            {
                var root = _rowRoot[r];
                var residual = root * (_response[_active[r]] - _values[r]);
                if (!double.IsFinite(residual))
                {
                    return false;
                }

                _b[r] = residual;
                rssTrial += residual * residual;
            }

            for (var j = 0; j < _p; j++)
            {
                var column = _a.AsSpan(j * m, m);
                for (var r = 0; r < m; r++)
                {
                    var g = _rowRoot[r] * column[r];
                    if (!double.IsFinite(g))
                    {
                        return false;
                    }

                    column[r] = g;
                }
            }

            if (rssTrial > rss * (1.0 + 1e-10))
            {
                return false;
            }

            _trial.CopyTo(_theta, 0);
            rss = rssTrial;
            previous = size;
            qr = QrOf(m);
            norms = _columnNorm;
            if (!ScaleAndFactor(m, qr, norms))
            {
                return false;
            }
        }

        return false;
    }

    /// <summary>The QR workspace for <paramref name="rows"/> rows, made on first use.</summary>
    private ReusableQr QrOf(int rows) => _qrs[rows] ??= new ReusableQr(rows, _p);

    /// <summary>The full Levenberg-Marquardt search from theta_hat on the resample's rows (point i repeated w_i times), and its verdict.</summary>
    private ResampleFailure Search()
    {
        HandedOver++;
        var rows = 0;
        for (var i = 0; i < _n; i++)
        {
            rows += (int)_weights[i];
        }

        if (!_searches.TryGetValue(rows, out var search))
        {
            search = new FullSearch(rows, _p, _v, _model.GradientScratchLength);
            _searches[rows] = search;
        }

        var row = 0;
        for (var i = 0; i < _n; i++)
        {
            for (var c = 0; c < (int)_weights[i]; c++)
            {
                _variables.AsSpan(i * _v, _v).CopyTo(search.Variables.AsSpan(row * _v, _v));
                search.Response[row] = _response[i];
                row++;
            }
        }

        var solver = search.Solver;
        solver.Reset(_model, search.Variables, search.Response, _options, _lower, _upper);
        _theta0.CopyTo(search.X, 0);
        var status = LevenbergMarquardt.Search(solver, search.X, _lower, _upper);
        switch (status)
        {
            case NonlinearFitStatus.MaxIterations:
                return ResampleFailure.NotConverged;
            case NonlinearFitStatus.NonFinite:
                return ResampleFailure.NonFinite;
            case NonlinearFitStatus.SingularJacobian:
                return ResampleFailure.RankDeficient;
        }

        foreach (var value in search.X)
        {
            if (!double.IsFinite(value))
            {
                return ResampleFailure.NonFinite;
            }
        }

        if (_lower is not null)
        {
            for (var j = 0; j < _p; j++)
            {
                if (search.X[j] <= _lower[j] || search.X[j] >= _upper![j])
                {
                    return ResampleFailure.AtBound;
                }
            }
        }

        // The Jacobian at the solution, with unit-norm columns: singular as the fitter judges it.
        var jacobian = solver.JacobianBuffer;
        if (!solver.JacobianInto(search.X, jacobian))
        {
            return ResampleFailure.NonFinite;
        }

        for (var j = 0; j < _p; j++)
        {
            var column = jacobian.AsSpan(j * rows, rows);
            var norm = VectorNorm.Of(column);
            if (norm == 0.0)
            {
                return ResampleFailure.RankDeficient;
            }

            foreach (ref var value in column)
            {
                value /= norm;
            }
        }

        solver.Qr.Factor(jacobian);
        if (!FullRank(solver.Qr))
        {
            return ResampleFailure.RankDeficient;
        }

        search.X.CopyTo(_theta, 0);
        return ResampleFailure.None;
    }

    /// <summary>The figures of the curve with parameters <paramref name="theta"/>: the parameters, then each derived figure.</summary>
    private ResampleFailure FiguresAt(ReadOnlySpan<double> theta, Span<double> figures)
    {
        var finite = true;
        for (var j = 0; j < _p; j++)
        {
            figures[j] = theta[j];
            finite &= double.IsFinite(theta[j]);
        }

        for (var d = 0; d < _derivedKinds.Length; d++)
        {
            if (_derivedKinds[d] == DerivedKind.InverseAt)
            {
                continue;
            }

            _point[0] = _derivedAt[d];
            var expression = _derivedKinds[d] == DerivedKind.SensitivityAt ? _slope! : _model;
            var value = expression.EvaluateWithGradient(theta, _point.AsSpan(0, 1), _gradient, _scratch);
            figures[_p + d] = value;
            finite &= double.IsFinite(value);
        }

        if (!finite)
        {
            return ResampleFailure.NonFinite;
        }

        if (_inverse is not null)
        {
            var failure = _inverse.Compute(theta, _inverseValues);
            if (failure != ResampleFailure.None)
            {
                return failure;
            }

            for (var d = 0; d < _inverseSlots.Length; d++)
            {
                figures[_inverseSlots[d]] = _inverseValues[d];
            }
        }

        return ResampleFailure.None;
    }

    /// <summary>Distinct set points among the points of positive weight.</summary>
    private int DistinctSetPoints()
    {
        if (++_stamp == int.MaxValue)
        {
            Array.Clear(_mark);
            _stamp = 1;
        }

        var count = 0;
        for (var i = 0; i < _n; i++)
        {
            if (_weights[i] > 0 && _mark[_setOf[i]] != _stamp)
            {
                _mark[_setOf[i]] = _stamp;
                count++;
            }
        }

        return count;
    }

    /// <summary>Scales the first <paramref name="rows"/> x p of <see cref="_a"/> (column-major) to unit-norm columns (the norms into <paramref name="norms"/>) and factorises; false when a column is 0 or a pivot is at or below <see cref="LevenbergMarquardt.RankTolerance"/> of the largest.</summary>
    private bool ScaleAndFactor(int rows, ReusableQr qr, double[] norms)
    {
        for (var j = 0; j < _p; j++)
        {
            var column = _a.AsSpan(j * rows, rows);
            var norm = VectorNorm.Of(column);
            if (!(norm > 0.0) || !double.IsFinite(norm))
            {
                return false;
            }

            norms[j] = norm;
            var inverse = 1.0 / norm;
            foreach (ref var value in column)
            {
                value *= inverse;
            }
        }

        qr.Factor(_a.AsSpan(0, rows * _p));
        return FullRank(qr);
    }

    private bool FullRank(ReusableQr qr)
    {
        var largest = Math.Abs(qr.R(0, 0));
        for (var k = 0; k < _p; k++)
        {
            if (!(Math.Abs(qr.R(k, k)) > LevenbergMarquardt.RankTolerance * largest))
            {
                return false;
            }
        }

        return true;
    }

    /// <summary>Each point's set point: points with the same inputs, bit for bit, share one.</summary>
    private static (int[] SetOf, int Sets) SetPoints(double[] variables, int n, int v)
    {
        var order = Enumerable.Range(0, n).ToArray();
        int Compare(int a, int b)
        {
            for (var k = 0; k < v; k++)
            {
                var c = variables[(a * v) + k].CompareTo(variables[(b * v) + k]);
                if (c != 0)
                {
                    return c;
                }
            }

            return a.CompareTo(b);
        }

        Array.Sort(order, Compare);
        var setOf = new int[n];
        var sets = 0;
        for (var r = 0; r < n; r++)
        {
            if (r > 0 && !variables.AsSpan(order[r] * v, v).SequenceEqual(variables.AsSpan(order[r - 1] * v, v)))
            {
                sets++;
            }

            setOf[order[r]] = sets;
        }

        return (setOf, n == 0 ? 0 : sets + 1);
    }

    /// <summary>The full search's solver and rows for resamples of one number of rows.</summary>
    private sealed class FullSearch(int rows, int p, int v, int scratchLength)
    {
        public LevenbergMarquardtSolver Solver { get; } = new(rows, p, scratchLength);

        public double[] Variables { get; } = new double[rows * v];

        public double[] Response { get; } = new double[rows];

        public double[] X { get; } = new double[p];
    }
}
