using StandFit.Core.Curve;
using StandFit.Core.Fitting;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>
/// The inverse_at figures of a resample of a model linear in its parameters: for each, the stimulus
/// x* where the refitted curve f(x; b*) = y0, by the full-data rule (<see cref="InverseRoot"/>: exactly
/// one step of the grid over the calibrated range holds a root; the root refined by safeguarded
/// Newton on the model's basis derivative, from the full-data root). A resample whose curve gives y0
/// nowhere in the range fails as <see cref="ResampleFailure.NoRootInRange"/>, one that gives it more
/// than once as <see cref="ResampleFailure.SeveralRoots"/>.
/// <para>
/// The grid is not evaluated afresh for every resample. A resample's curve differs from the fit's by
/// f(x; b*) - f(x; b_hat) = phi(x)' M a, a the resample's change in Q coordinates
/// (<see cref="LinearResampler"/>), so at grid point x_k it moves by at most ||c_k|| ||a|| with
/// c_k = M' phi(x_k) (Cauchy-Schwarz). Where the fit's gap |g_k| exceeds that (less a margin of
/// 1e-10 of the sum of the terms' sizes for rounding), the resample's gap keeps the fit's sign. The
/// grid points are sorted once by the ||a|| they can stand, |g_k| / ||c_k||; a resample evaluates
/// only those whose bound it reaches (for a good sweep a few next to the root) and recounts only the
/// steps beside them, so its root count is that of the full scan. Nothing is allocated per resample.
/// </para>
/// </summary>
internal sealed class LinearInverse
{
    /// <summary>Relative room left for rounding between a gap computed directly and one bounded through the Q coordinates.</summary>
    public const double RoundingMargin = 1e-10;

    private const int Points = InverseRoot.ScanSteps + 1;

    private readonly LinearModel _model;
    private readonly int _p;
    private readonly double[] _m;          // p x p row-major: natural parameters per unit of Q coordinate
    private readonly double[] _estimates;  // b_hat
    private readonly double[] _grid;
    private readonly Figure[] _figures;
    private readonly double[] _b;          // b* of the resample
    private readonly double[] _value;      // gaps evaluated for the current figure (where _mark is the stamp)
    private readonly int[] _mark;
    private int _stamp;

    /// <param name="fit">The fit on the original data.</param>
    /// <param name="map">M, p x p row-major: b* = b_hat + M a.</param>
    /// <param name="responses">y0 of each inverse figure; each must have exactly one root on the fit (<see cref="InversePrediction.RootOf"/>).</param>
    public LinearInverse(FitResult fit, double[] map, ReadOnlySpan<double> responses)
    {
        _model = fit.Model;
        _p = fit.ParameterCount;
        _m = map;
        _estimates = fit.Estimates.ToArray();
        var lo = fit.InputMin[0];
        var hi = fit.InputMax[0];
        _grid = new double[Points];
        for (var k = 0; k < Points; k++)
        {
            _grid[k] = InverseRoot.GridPoint(lo, hi, k);
        }

        _b = new double[_p];
        _value = new double[Points];
        _mark = new int[Points];

        // c_k = M' phi(x_k) and the size of each grid point's terms, shared by every figure.
        var basis = new double[_p];
        var reachOfMove = new double[Points];
        var terms = new double[Points];
        for (var k = 0; k < Points; k++)
        {
            _model.FillBasis([_grid[k]], basis);
            var norm = 0.0;
            for (var c = 0; c < _p; c++)
            {
                var sum = 0.0;
                for (var j = 0; j < _p; j++)
                {
                    sum += basis[j] * _m[(j * _p) + c];
                }

                norm += sum * sum;
            }

            var size = 0.0;
            for (var j = 0; j < _p; j++)
            {
                size += Math.Abs(basis[j] * _estimates[j]);
            }

            reachOfMove[k] = Math.Sqrt(norm);
            terms[k] = size;
        }

        _figures = new Figure[responses.Length];
        for (var d = 0; d < responses.Length; d++)
        {
            var y0 = responses[d];
            var gaps = new double[Points];
            for (var k = 0; k < Points; k++)
            {
                gaps[k] = _model.Evaluate(_estimates, [_grid[k]]) - y0;
            }

            if (InverseRoot.CountRoots(gaps, out var step) != 1)
            {
                throw new ArgumentException("An inverse figure that is not solved on the fit is not resampled.", nameof(responses));
            }

            var curve = new Curve(_model, _estimates, y0);
            var a = _grid[Math.Max(step - 1, 0)];
            var b = _grid[step];
            var root = InverseRoot.Refine(ref curve, a, b, a + ((b - a) / 2));

            var bound = new double[Points];
            var order = new int[Points];
            for (var k = 0; k < Points; k++)
            {
                order[k] = k;
                var room = Math.Abs(gaps[k]) - (RoundingMargin * (terms[k] + Math.Abs(y0)));
                bound[k] = !double.IsFinite(room) || room <= 0 ? double.NegativeInfinity
                    : reachOfMove[k] > 0 ? room / reachOfMove[k]
                    : double.PositiveInfinity;
            }

            Array.Sort(bound, order);
            _figures[d] = new Figure(y0, root, step, gaps, bound, order);
        }
    }

    /// <summary>The number of inverse figures.</summary>
    public int Count => _figures.Length;

    /// <summary>Figure d's root on the original data.</summary>
    public double Estimate(int d) => _figures[d].Root;

    /// <summary>
    /// The roots of the resample whose change in Q coordinates is <paramref name="coords"/> (p
    /// values) into <paramref name="output"/> (one per figure); the first failure's cause, or None.
    /// b* is formed exactly as <see cref="LinearResampler"/> forms a parameter's figure.
    /// </summary>
    public ResampleFailure Compute(ReadOnlySpan<double> coords, Span<double> output)
    {
        var p = _p;
        var squares = 0.0;
        for (var c = 0; c < p; c++)
        {
            squares += coords[c] * coords[c];
        }

        var move = Math.Sqrt(squares) * (1 + 1e-9);
        for (var j = 0; j < p; j++)
        {
            var value = _estimates[j];
            for (var c = 0; c < p; c++)
            {
                value += _m[(j * p) + c] * coords[c];
            }

            _b[j] = value;
        }

        for (var d = 0; d < _figures.Length; d++)
        {
            var failure = Root(_figures[d], move, out output[d]);
            if (failure != ResampleFailure.None)
            {
                return failure;
            }
        }

        return ResampleFailure.None;
    }

    private ResampleFailure Root(Figure figure, double move, out double root)
    {
        root = double.NaN;
        if (++_stamp == int.MaxValue)
        {
            Array.Clear(_mark);
            _stamp = 1;
        }

        var stamp = _stamp;
        var bound = figure.Bound;
        var order = figure.Order;
        var uncertain = 0;
        while (uncertain < Points && bound[uncertain] <= move)
        {
            var k = order[uncertain++];
            _value[k] = _model.Evaluate(_b, new ReadOnlySpan<double>(in _grid[k])) - figure.Response;
            _mark[k] = stamp;
        }

        // The steps beside an evaluated point: recount them, each once (a step between two
        // evaluated points is counted from its right end).
        var count = 1;
        var step = figure.Step;
        var found = -1;
        for (var u = 0; u < uncertain; u++)
        {
            var k = order[u];
            Recount(figure, k, stamp, ref count, ref found);
            if (k + 1 < Points && _mark[k + 1] != stamp)
            {
                Recount(figure, k + 1, stamp, ref count, ref found);
            }
        }

        if (count != 1)
        {
            return count == 0 ? ResampleFailure.NoRootInRange : ResampleFailure.SeveralRoots;
        }

        if (found >= 0)
        {
            step = found;
        }

        // The gaps at the step's ends: evaluated, or of the fit's sign (which the bound guarantees).
        var curve = new Curve(_model, _b, figure.Response);
        var left = Math.Max(step - 1, 0);
        root = InverseRoot.Refine(ref curve, _grid[left], Gap(figure.Gaps, left, stamp), _grid[step], Gap(figure.Gaps, step, stamp), figure.Root);
        return double.IsFinite(root) ? ResampleFailure.None : ResampleFailure.NonFinite;
    }

    /// <summary>Step j (j = 0: a root on x_0) on the resample's gaps against the fit's: the count moves by the difference.</summary>
    private void Recount(Figure figure, int j, int stamp, ref int count, ref int found)
    {
        var fit = figure.Gaps;
        bool before, after;
        if (j == 0)
        {
            before = fit[0] == 0;
            after = Gap(fit, 0, stamp) == 0;
        }
        else
        {
            before = InverseRoot.StepCrosses(fit[j - 1], fit[j]);
            after = InverseRoot.StepCrosses(Gap(fit, j - 1, stamp), Gap(fit, j, stamp));
        }

        if (before)
        {
            count--;
        }

        if (after)
        {
            count++;
            found = j;
        }
    }

    private double Gap(double[] fit, int k, int stamp) => _mark[k] == stamp ? _value[k] : fit[k];

    private sealed record Figure(double Response, double Root, int Step, double[] Gaps, double[] Bound, int[] Order);

    /// <summary>f(x; b) - y0 and f'(x; b) of the linear model.</summary>
    private readonly struct Curve(LinearModel model, double[] parameters, double response) : IGapCurve
    {
        public double Gap(double x) => model.Evaluate(parameters, new ReadOnlySpan<double>(in x)) - response;

        public double Slope(double x) => model.Derivative(parameters, new ReadOnlySpan<double>(in x));
    }
}
