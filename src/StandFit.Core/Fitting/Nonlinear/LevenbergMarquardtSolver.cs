using StandFit.Core.Fitting.Expressions;

namespace StandFit.Core.Fitting.Nonlinear;

/// <summary>
/// The Levenberg-Marquardt search of one fit (Moré, J. J. (1978), "The Levenberg-Marquardt
/// algorithm: implementation and theory", Numerical Analysis, Lecture Notes in Mathematics 630,
/// pp. 105-116): a trust region on the scaled step ||D s|| &lt;= delta, with D from the Jacobian's
/// column norms (each never decreasing), the Levenberg-Marquardt parameter lambda found for each
/// radius by a safeguarded Newton iteration on the secular equation, and every step solved by QR
/// of the augmented system [J; sqrt(lambda) D] s = [-f; 0]: the Jacobian's pivoted QR reduces it to
/// [R; sqrt(lambda) D P], whose rows are then eliminated by Givens rotations. Normal equations are
/// never formed. Every buffer is allocated once, by the constructor, for fits of n points and p
/// parameters; <see cref="Reset"/> points the solver at the next fit's data (of the same shape)
/// without allocating, so one solver serves many fits on one thread (never two at once).
/// <para>
/// Bounds are kept by projection: a trial point is projected onto the box; a parameter that sits
/// on a bound while the descent direction points out of the box is held there for the iteration
/// (its Jacobian column is dropped from the step); and the predicted reduction of a projected step
/// is computed for the step actually taken, so the trust-region ratio stays honest.
/// </para>
/// </summary>
internal sealed class LevenbergMarquardtSolver
{
    private const double Dwarf = 2.2250738585072014E-308;
    private const double Epsilon = 2.220446049250313E-16;
    private const int MaxTrialsPerIteration = 200;

    /// <summary>A refinement step below this relative size changes nothing worth a further step.</summary>
    private const double NegligibleStep = 4 * Epsilon;

    /// <summary>Refinement goes on only while each step is at most this fraction of the one before.</summary>
    private const double RefinementContraction = 0.9;

    private readonly int _n;
    private readonly int _p;
    private ModelExpression _model;
    private int _variableCount;
    private double[] _variables;   // n x variableCount, row-major
    private double[] _y;
    private LevenbergMarquardtOptions _options;
    private double[]? _lower;
    private double[]? _upper;

    private readonly ReusableQr _qr;
    private readonly double[] _jacobian;    // n x p, column-major: d model_i / d b_j
    private readonly double[] _f;           // model - y at the current point
    private readonly double[] _fTrial;
    private readonly double[] _qtf;
    private readonly double[] _r;           // p x p row-major
    private readonly double[] _s;           // p x p row-major: triangular factor of the augmented system
    private readonly double[] _diag;
    private readonly double[] _jNorm;
    private readonly double[] _xTrial;
    private readonly double[] _step;
    private readonly double[] _lmx;         // solution of the augmented system (the step is its negative)
    private readonly double[] _sDiagonal;
    private readonly double[] _wa1;
    private readonly double[] _wa2;
    private readonly double[] _wa3;
    private readonly double[] _wa4;
    private readonly double[] _rowGradient;
    private double[] _scratch;

    public LevenbergMarquardtSolver(ModelExpression model, double[] variables, double[] y, LevenbergMarquardtOptions options, double[]? lower, double[]? upper)
        : this(y.Length, model.ParameterCount, model.GradientScratchLength)
    {
        Reset(model, variables, y, options, lower, upper);
    }

    /// <summary>A solver for fits of <paramref name="n"/> points and <paramref name="p"/> parameters, with no data yet (<see cref="Reset"/> gives it).</summary>
    public LevenbergMarquardtSolver(int n, int p, int scratchLength)
    {
        _n = n;
        _p = p;
        _model = null!;
        _variables = [];
        _y = [];
        _options = LevenbergMarquardtOptions.Default;
        _qr = new ReusableQr(_n, _p);
        _jacobian = new double[_n * _p];
        _f = new double[_n];
        _fTrial = new double[_n];
        _qtf = new double[_n];
        _r = new double[_p * _p];
        _s = new double[_p * _p];
        _diag = new double[_p];
        _jNorm = new double[_p];
        _xTrial = new double[_p];
        _step = new double[_p];
        _lmx = new double[_p];
        _sDiagonal = new double[_p];
        _wa1 = new double[_p];
        _wa2 = new double[_p];
        _wa3 = new double[_p];
        _wa4 = new double[_p];
        _rowGradient = new double[_p];
        _scratch = new double[scratchLength];
        CovarianceScale = new double[p];
        CovarianceR = new double[p * p];
        CovarianceInverse = new double[p * p];
        CovarianceScratch = new double[p * p];
    }

    /// <summary>Points of the fits this solver serves.</summary>
    public int Points => _n;

    /// <summary>Parameters of the fits this solver serves.</summary>
    public int ParameterCount => _p;

    /// <summary>Buffers for the covariance after the search (p, p x p, p x p, p x p), free for the caller.</summary>
    internal double[] CovarianceScale { get; }

    internal double[] CovarianceR { get; }

    internal double[] CovarianceInverse { get; }

    internal double[] CovarianceScratch { get; }

    /// <summary>
    /// Points the solver at a new fit of the same n and p: the model, its data (read in place, not
    /// copied: the caller may overwrite them between fits), options and bounds. Allocates only when
    /// the model needs more gradient scratch than any model before it.
    /// </summary>
    public void Reset(ModelExpression model, double[] variables, double[] y, LevenbergMarquardtOptions options, double[]? lower, double[]? upper)
    {
        if (model.ParameterCount != _p || y.Length != _n || variables.Length < _n * model.VariableCount)
        {
            throw new ArgumentException("The solver was made for fits of another shape.");
        }

        _model = model;
        _variableCount = model.VariableCount;
        _variables = variables;
        _y = y;
        _options = options;
        _lower = lower;
        _upper = upper;
        if (_scratch.Length < model.GradientScratchLength)
        {
            _scratch = new double[model.GradientScratchLength];
        }

        Iterations = 0;
        Evaluations = 0;
    }

    /// <summary>The solver's QR workspace (n x p), free for the caller once the search and refinement are done.</summary>
    internal ReusableQr Qr => _qr;

    /// <summary>The solver's Jacobian buffer (n x p, column-major), free for the caller once the search and refinement are done.</summary>
    internal double[] JacobianBuffer => _jacobian;

    /// <summary>Jacobian evaluations (iterations) so far.</summary>
    public int Iterations { get; private set; }

    /// <summary>Evaluations of the model at every point: the start and each trial step.</summary>
    public int Evaluations { get; private set; }

    /// <summary>Searches from <paramref name="x"/> (overwritten with the last accepted point) and says how the search ended.</summary>
    public NonlinearFitStatus Run(double[] x)
    {
        var ftol = Math.Max(_options.RssTolerance, Epsilon);
        var xtol = Math.Max(_options.StepTolerance, Epsilon);
        var gtol = Math.Max(_options.GradientTolerance, Epsilon);
        var f = _f;
        var fTrial = _fTrial;

        Evaluations = 1;
        if (!Residuals(x, f))
        {
            return NonlinearFitStatus.NonFinite;
        }

        var fnorm = VectorNorm.Of(f);
        var delta = 0.0;
        var xnorm = 0.0;
        var par = 0.0;
        Iterations = 0;
        while (true)
        {
            if (Iterations >= _options.MaxIterations)
            {
                return NonlinearFitStatus.MaxIterations;
            }

            Iterations++;
            if (!Jacobian(x))
            {
                return NonlinearFitStatus.NonFinite;
            }

            if (_lower is not null)
            {
                HoldBlockedParameters(x, f);
            }

            for (var j = 0; j < _p; j++)
            {
                _jNorm[j] = VectorNorm.Of(_jacobian.AsSpan(j * _n, _n));
            }

            _qr.Factor(_jacobian);
            _qr.CopyR(_r);
            f.CopyTo(_qtf, 0);
            _qr.ApplyQTranspose(_qtf);

            if (Iterations == 1)
            {
                for (var j = 0; j < _p; j++)
                {
                    _diag[j] = _jNorm[j] == 0.0 ? 1.0 : _jNorm[j];
                }

                xnorm = ScaledNorm(x);
                delta = _options.InitialStepFactor * xnorm;
                if (delta == 0.0)
                {
                    delta = _options.InitialStepFactor;
                }
            }

            // The scaled gradient: the largest cosine between f and a column of J.
            var gnorm = 0.0;
            if (fnorm != 0.0)
            {
                for (var k = 0; k < _p; k++)
                {
                    var l = _qr.Permutation(k);
                    if (_jNorm[l] == 0.0)
                    {
                        continue;
                    }

                    var sum = 0.0;
                    for (var i = 0; i <= k; i++)
                    {
                        sum += _r[(i * _p) + k] * (_qtf[i] / fnorm);
                    }

                    gnorm = Math.Max(gnorm, Math.Abs(sum / _jNorm[l]));
                }
            }

            if (!(gnorm > gtol))
            {
                return double.IsNaN(gnorm) ? NonlinearFitStatus.NonFinite : NonlinearFitStatus.ConvergedGradient;
            }

            for (var j = 0; j < _p; j++)
            {
                _diag[j] = Math.Max(_diag[j], _jNorm[j]);
            }

            for (var trial = 1; ; trial++)
            {
                LmParameter(delta, ref par);
                var projected = false;
                for (var j = 0; j < _p; j++)
                {
                    var target = x[j] - _lmx[j];
                    if (_lower is not null)
                    {
                        var clamped = Math.Clamp(target, _lower[j], _upper![j]);
                        projected |= clamped != target;
                        target = clamped;
                    }

                    _xTrial[j] = target;
                    _step[j] = target - x[j];
                }

                var pnorm = ScaledNorm(_step);
                if (Iterations == 1)
                {
                    delta = Math.Min(delta, pnorm);
                }

                Evaluations++;
                var fnorm1 = Residuals(_xTrial, fTrial) ? VectorNorm.Of(fTrial) : double.PositiveInfinity;
                var actred = -1.0;
                if (0.1 * fnorm1 < fnorm)
                {
                    var q = fnorm1 / fnorm;
                    actred = 1.0 - (q * q);
                }

                // v = R P' s: the change of Q'f the linear model predicts (||J s|| = ||v||).
                for (var i = 0; i < _p; i++)
                {
                    var sum = 0.0;
                    for (var j = i; j < _p; j++)
                    {
                        sum += _r[(i * _p) + j] * _step[_qr.Permutation(j)];
                    }

                    _wa3[i] = sum / fnorm;
                }

                double prered, dirder;
                var jsNorm = VectorNorm.Of(_wa3);
                if (!projected)
                {
                    var t1 = jsNorm;
                    var t2 = Math.Sqrt(par) * pnorm / fnorm;
                    prered = (t1 * t1) + (t2 * t2 / 0.5);
                    dirder = -((t1 * t1) + (t2 * t2));
                }
                else
                {
                    var dot = 0.0;
                    for (var i = 0; i < _p; i++)
                    {
                        dot += (_qtf[i] / fnorm) * _wa3[i];
                    }

                    prered = -((2.0 * dot) + (jsNorm * jsNorm));
                    dirder = dot;
                }

                var ratio = prered != 0.0 ? actred / prered : 0.0;
                if (ratio <= 0.25)
                {
                    var temp = actred >= 0.0 ? 0.5 : 0.5 * dirder / (dirder + (0.5 * actred));
                    if (0.1 * fnorm1 >= fnorm || !(temp >= 0.1))
                    {
                        temp = 0.1;
                    }

                    delta = temp * Math.Min(delta, pnorm / 0.1);
                    par /= temp;
                }
                else if (par == 0.0 || ratio >= 0.75)
                {
                    delta = pnorm / 0.5;
                    par *= 0.5;
                }

                var accepted = ratio >= 1e-4;
                if (accepted)
                {
                    _xTrial.CopyTo(x, 0);
                    fTrial.CopyTo(f, 0);
                    fnorm = fnorm1;
                    xnorm = ScaledNorm(x);
                }

                if (Math.Abs(actred) <= ftol && prered <= ftol && 0.5 * ratio <= 1.0)
                {
                    return NonlinearFitStatus.ConvergedRss;
                }

                if (delta <= xtol * xnorm)
                {
                    return NonlinearFitStatus.ConvergedStep;
                }

                if (accepted)
                {
                    break;
                }

                if (trial >= MaxTrialsPerIteration)
                {
                    return NonlinearFitStatus.MaxIterations;
                }
            }
        }
    }

    /// <summary>
    /// Drops the Jacobian column of every parameter that sits on a bound while the descent
    /// direction -J'f points out of the box: it stays where it is for this iteration.
    /// </summary>
    private void HoldBlockedParameters(double[] x, double[] f)
    {
        for (var j = 0; j < _p; j++)
        {
            var column = _jacobian.AsSpan(j * _n, _n);
            var descent = 0.0;
            for (var i = 0; i < _n; i++)
            {
                descent -= column[i] * f[i];
            }

            if ((x[j] <= _lower![j] && descent < 0) || (x[j] >= _upper![j] && descent > 0))
            {
                column.Clear();
            }
        }
    }

    /// <summary>
    /// The Levenberg-Marquardt parameter for trust radius <paramref name="delta"/> (Moré 1978,
    /// section 5): lambda = 0 when the Gauss-Newton step fits inside the region; otherwise the
    /// lambda whose step has ||D s|| within 10 % of delta, by Newton's method on
    /// phi(lambda) = ||D s(lambda)|| - delta kept inside bounds that shrink every step. Leaves the
    /// solution of the augmented system in <see cref="_lmx"/> (the step is its negative).
    /// </summary>
    private void LmParameter(double delta, ref double par)
    {
        var p = _p;
        var nsing = p;
        for (var j = 0; j < p; j++)
        {
            _wa1[j] = _qtf[j];
            if (_r[(j * p) + j] == 0.0 && nsing == p)
            {
                nsing = j;
            }

            if (nsing < p)
            {
                _wa1[j] = 0.0;
            }
        }

        for (var j = nsing - 1; j >= 0; j--)
        {
            _wa1[j] /= _r[(j * p) + j];
            var temp = _wa1[j];
            for (var i = 0; i < j; i++)
            {
                _wa1[i] -= _r[(i * p) + j] * temp;
            }
        }

        for (var j = 0; j < p; j++)
        {
            _lmx[_qr.Permutation(j)] = _wa1[j];
        }

        for (var j = 0; j < p; j++)
        {
            _wa2[j] = _diag[j] * _lmx[j];
        }

        var dxnorm = VectorNorm.Of(_wa2);
        var fp = dxnorm - delta;
        if (fp <= 0.1 * delta)
        {
            par = 0.0;
            return;
        }

        // Lower bound: from phi'(0) when J has full rank.
        var parl = 0.0;
        if (nsing == p)
        {
            for (var j = 0; j < p; j++)
            {
                var l = _qr.Permutation(j);
                _wa1[j] = _diag[l] * (_wa2[l] / dxnorm);
            }

            for (var j = 0; j < p; j++)
            {
                var sum = 0.0;
                for (var i = 0; i < j; i++)
                {
                    sum += _r[(i * p) + j] * _wa1[i];
                }

                _wa1[j] = (_wa1[j] - sum) / _r[(j * p) + j];
            }

            var temp = VectorNorm.Of(_wa1);
            parl = fp / delta / temp / temp;
        }

        // Upper bound: ||D^-1 J'f|| / delta.
        for (var j = 0; j < p; j++)
        {
            var sum = 0.0;
            for (var i = 0; i <= j; i++)
            {
                sum += _r[(i * p) + j] * _qtf[i];
            }

            _wa1[j] = sum / _diag[_qr.Permutation(j)];
        }

        var gnorm = VectorNorm.Of(_wa1);
        var paru = gnorm / delta;
        if (paru == 0.0)
        {
            paru = Dwarf / Math.Min(delta, 0.1);
        }

        par = Math.Max(par, parl);
        par = Math.Min(par, paru);
        if (par == 0.0)
        {
            par = gnorm / dxnorm;
        }

        for (var iteration = 1; ; iteration++)
        {
            if (par == 0.0)
            {
                par = Math.Max(Dwarf, 0.001 * paru);
            }

            var root = Math.Sqrt(par);
            for (var j = 0; j < p; j++)
            {
                _wa1[j] = root * _diag[j];
            }

            SolveAugmented(_wa1);
            for (var j = 0; j < p; j++)
            {
                _wa2[j] = _diag[j] * _lmx[j];
            }

            dxnorm = VectorNorm.Of(_wa2);
            var previous = fp;
            fp = dxnorm - delta;
            if (Math.Abs(fp) <= 0.1 * delta || (parl == 0.0 && fp <= previous && previous < 0.0) || iteration == 10)
            {
                return;
            }

            // Newton correction: phi / phi' from the factor S of the augmented system.
            for (var j = 0; j < p; j++)
            {
                var l = _qr.Permutation(j);
                _wa1[j] = _diag[l] * (_wa2[l] / dxnorm);
            }

            for (var j = 0; j < p; j++)
            {
                _wa1[j] /= _sDiagonal[j];
                var temp = _wa1[j];
                for (var i = j + 1; i < p; i++)
                {
                    _wa1[i] -= _s[(j * p) + i] * temp;
                }
            }

            var norm = VectorNorm.Of(_wa1);
            var parc = fp / delta / norm / norm;
            if (fp > 0.0)
            {
                parl = Math.Max(parl, par);
            }

            if (fp < 0.0)
            {
                paru = Math.Min(paru, par);
            }

            par = Math.Max(parl, par + parc);
        }
    }

    /// <summary>
    /// Solves min || [J; diag(d)] z - [f; 0] || for z (into <see cref="_lmx"/>) from J's pivoted QR:
    /// the rows of diag(d) P are eliminated one by one against R by Givens rotations, giving the
    /// triangular factor S of the augmented matrix (in <see cref="_s"/>, its diagonal in
    /// <see cref="_sDiagonal"/>); then S z' = (rotated Q'f) by back substitution.
    /// </summary>
    private void SolveAugmented(double[] d)
    {
        var p = _p;
        _r.AsSpan().CopyTo(_s);
        var z = _wa4;
        _qtf.AsSpan(0, p).CopyTo(z);
        var w = _wa3;
        for (var j = 0; j < p; j++)
        {
            var dj = d[_qr.Permutation(j)];
            if (dj == 0.0)
            {
                continue;
            }

            w.AsSpan(j).Clear();
            w[j] = dj;
            var extra = 0.0;
            for (var k = j; k < p; k++)
            {
                if (w[k] == 0.0)
                {
                    continue;
                }

                var skk = _s[(k * p) + k];
                double c, s;
                if (Math.Abs(skk) < Math.Abs(w[k]))
                {
                    var cot = skk / w[k];
                    s = 0.5 / Math.Sqrt(0.25 + (0.25 * cot * cot));
                    c = s * cot;
                }
                else
                {
                    var tan = w[k] / skk;
                    c = 0.5 / Math.Sqrt(0.25 + (0.25 * tan * tan));
                    s = c * tan;
                }

                _s[(k * p) + k] = (c * skk) + (s * w[k]);
                var zk = z[k];
                z[k] = (c * zk) + (s * extra);
                extra = (-s * zk) + (c * extra);
                for (var i = k + 1; i < p; i++)
                {
                    var ski = _s[(k * p) + i];
                    _s[(k * p) + i] = (c * ski) + (s * w[i]);
                    w[i] = (-s * ski) + (c * w[i]);
                }

                w[k] = 0.0;
            }
        }

        var nsing = p;
        for (var j = 0; j < p; j++)
        {
            if (_s[(j * p) + j] == 0.0 && nsing == p)
            {
                nsing = j;
            }

            if (nsing < p)
            {
                z[j] = 0.0;
            }
        }

        for (var j = nsing - 1; j >= 0; j--)
        {
            var sum = 0.0;
            for (var i = j + 1; i < nsing; i++)
            {
                sum += _s[(j * p) + i] * z[i];
            }

            z[j] = (z[j] - sum) / _s[(j * p) + j];
        }

        for (var j = 0; j < p; j++)
        {
            _lmx[_qr.Permutation(j)] = z[j];
            _sDiagonal[j] = _s[(j * p) + j];
        }
    }

    private double ScaledNorm(ReadOnlySpan<double> v)
    {
        for (var j = 0; j < _p; j++)
        {
            _wa2[j] = _diag[j] * v[j];
        }

        return VectorNorm.Of(_wa2);
    }

    /// <summary>
    /// Refines a converged point by Gauss-Newton steps solved by the pivoted QR of the Jacobian
    /// with unit-norm columns. The search's own stopping tests are limited by the rounding of the
    /// RSS (a relative change below about 1e-16 cannot be seen), while the Gauss-Newton step comes
    /// from the residuals and the Jacobian directly; near a solution each step removes a fixed
    /// fraction of what is left (most of it for a small-residual fit, less where the residuals are
    /// large and the model curved). With <paramref name="precise"/> the residuals are taken in
    /// double-double (the model to about 32 digits, the difference from y rounded once), which
    /// matters only for a nearly exact fit. A step is taken only while the steps shrink by at
    /// least 10 %, are not negligible, keep the point inside the bounds and do not make the RSS
    /// grow beyond rounding. Returns the steps kept.
    /// </summary>
    public int Refine(double[] x, int maxSteps, bool precise)
    {
        if (!(precise ? PreciseResiduals(x, _f) : Residuals(x, _f)))
        {
            return 0;
        }

        var rss = SumOfSquares(_f);
        var previous = double.PositiveInfinity;
        var kept = 0;
        for (var step = 0; step < maxSteps; step++)
        {
            if (!Jacobian(x))
            {
                break;
            }

            for (var j = 0; j < _p; j++)
            {
                var column = _jacobian.AsSpan(j * _n, _n);
                _jNorm[j] = VectorNorm.Of(column);
                if (_jNorm[j] == 0.0)
                {
                    return kept;
                }

                for (var i = 0; i < _n; i++)
                {
                    column[i] /= _jNorm[j];
                }
            }

            _qr.Factor(_jacobian);
            _qr.CopyR(_r);
            _f.CopyTo(_qtf, 0);
            _qr.ApplyQTranspose(_qtf);
            var largest = Math.Abs(_r[0]);
            for (var k = 0; k < _p; k++)
            {
                if (!(Math.Abs(_r[(k * _p) + k]) > LevenbergMarquardt.RankTolerance * largest))
                {
                    return kept;
                }
            }

            for (var k = _p - 1; k >= 0; k--)
            {
                var sum = _qtf[k];
                for (var j = k + 1; j < _p; j++)
                {
                    sum -= _r[(k * _p) + j] * _wa1[j];
                }

                _wa1[k] = sum / _r[(k * _p) + k];
            }

            var negligible = true;
            var inside = true;
            for (var k = 0; k < _p; k++)
            {
                var j = _qr.Permutation(k);
                _step[j] = -_wa1[k] / _jNorm[j];
                _xTrial[j] = x[j] + _step[j];
                negligible &= Math.Abs(_step[j]) <= NegligibleStep * Math.Abs(x[j]);
                inside &= _lower is null || (_xTrial[j] >= _lower[j] && _xTrial[j] <= _upper![j]);
            }

            var size = ScaledNorm(_step);
            negligible |= size <= NegligibleStep * ScaledNorm(x);
            if (negligible || !inside || size > RefinementContraction * previous)
            {
                break;
            }

            Evaluations++;
            if (!(precise ? PreciseResiduals(_xTrial, _fTrial) : Residuals(_xTrial, _fTrial)))
            {
                break;
            }

            var rssTrial = SumOfSquares(_fTrial);
            if (rssTrial > rss * (1.0 + 1e-10))
            {
                break;
            }

            _xTrial.CopyTo(x, 0);
            _fTrial.CopyTo(_f, 0);
            rss = rssTrial;
            kept++;
            previous = size;
        }

        return kept;
    }

    /// <summary>f = model - y at every point with the model in double-double, the difference rounded once; false when any value is not finite.</summary>
    internal bool PreciseResiduals(ReadOnlySpan<double> x, Span<double> f)
    {
        for (var i = 0; i < _n; i++)
        {
            var value = -DoubleDouble.Subtract(_y[i], _model.EvaluatePrecise(x, _variables.AsSpan(i * _variableCount, _variableCount)));
            if (!double.IsFinite(value))
            {
                return false;
            }

            f[i] = value;
        }

        return true;
    }

    private static double SumOfSquares(ReadOnlySpan<double> values)
    {
        var sum = 0.0;
        foreach (var v in values)
        {
            sum += v * v;
        }

        return sum;
    }

    /// <summary>f = model - y at every point; false when any value is not finite.</summary>
    internal bool Residuals(ReadOnlySpan<double> x, Span<double> f)
    {
        for (var i = 0; i < _n; i++)
        {
            var value = _model.Evaluate(x, _variables.AsSpan(i * _variableCount, _variableCount)) - _y[i];
            if (!double.IsFinite(value))
            {
                return false;
            }

            f[i] = value;
        }

        return true;
    }

    /// <summary>The Jacobian at <paramref name="x"/> into <see cref="_jacobian"/>; false when any entry is not finite.</summary>
    internal bool Jacobian(ReadOnlySpan<double> x)
    {
        return JacobianInto(x, _jacobian);
    }

    /// <summary>The Jacobian at <paramref name="x"/> (column-major n x p) into <paramref name="jacobian"/>.</summary>
    internal bool JacobianInto(ReadOnlySpan<double> x, Span<double> jacobian)
    {
        for (var i = 0; i < _n; i++)
        {
            _model.EvaluateWithGradient(x, _variables.AsSpan(i * _variableCount, _variableCount), _rowGradient, _scratch);
            for (var j = 0; j < _p; j++)
            {
                var g = _rowGradient[j];
                if (!double.IsFinite(g))
                {
                    return false;
                }

                jacobian[(j * _n) + i] = g;
            }
        }

        return true;
    }
}
