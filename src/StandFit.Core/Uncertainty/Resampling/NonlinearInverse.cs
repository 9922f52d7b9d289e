using StandFit.Core.Curve;
using StandFit.Core.Fitting.Expressions;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>
/// The inverse_at figures of a refitted expression model (one input): for each, the stimulus x*
/// where f(x; theta*) = y0, by the full-data rule (<see cref="InverseRoot"/>). The curve is
/// evaluated at every point of the grid over the calibrated range in one pass over the program
/// (<see cref="ModelExpression.EvaluateBatch"/>, values only, bit for bit the per-point value the
/// full-data figure uses), once per resample for all its inverse figures; a nonlinear curve has no
/// bound on how far it moves between grid points that would let points be skipped. The root is
/// refined by safeguarded Newton on the expression's symbolic derivative, from the full-data root.
/// Every buffer is allocated by the constructor.
/// </summary>
internal sealed class NonlinearInverse
{
    private const int Points = InverseRoot.ScanSteps + 1;

    private readonly ModelExpression _model;
    private readonly ModelExpression _slope;
    private readonly double[] _responses;
    private readonly double[] _roots;      // on the original data
    private readonly double[] _grid;
    private readonly int[] _rows;
    private readonly double[] _values;
    private readonly double[] _gaps;
    private readonly double[] _batchScratch;
    private readonly double[] _point = new double[1];
    private readonly double[] _gradient;
    private readonly double[] _scratch;
    private readonly double[] _theta;      // the curve's parameters while its roots are refined

    /// <param name="model">The expression (one input).</param>
    /// <param name="theta">The estimates on the original data.</param>
    /// <param name="lo">The calibrated range's low end.</param>
    /// <param name="hi">Its high end.</param>
    /// <param name="responses">y0 of each inverse figure; each must be solved on the fit.</param>
    public NonlinearInverse(ModelExpression model, ReadOnlySpan<double> theta, double lo, double hi, ReadOnlySpan<double> responses)
    {
        _model = model;
        _slope = model.InputDerivative(0);
        var p = model.ParameterCount;
        _responses = responses.ToArray();
        _grid = new double[Points];
        _rows = new int[Points];
        for (var k = 0; k < Points; k++)
        {
            _grid[k] = InverseRoot.GridPoint(lo, hi, k);
            _rows[k] = k;
        }

        _values = new double[Points];
        _gaps = new double[Points];
        _batchScratch = new double[model.ValueBatchScratchLength(Points)];
        _gradient = new double[p];
        _scratch = new double[Math.Max(model.GradientScratchLength, _slope.GradientScratchLength)];
        _theta = new double[p];
        _roots = new double[_responses.Length];
        var failure = Compute(theta, original: true, _roots);
        if (failure != ResampleFailure.None)
        {
            throw new ArgumentException("An inverse figure that is not solved on the fit is not resampled.", nameof(responses));
        }
    }

    /// <summary>The number of inverse figures.</summary>
    public int Count => _responses.Length;

    /// <summary>Figure d's root on the original data.</summary>
    public double Estimate(int d) => _roots[d];

    /// <summary>The roots of the curve with parameters <paramref name="theta"/> into <paramref name="output"/>; the first failure's cause, or None.</summary>
    public ResampleFailure Compute(ReadOnlySpan<double> theta, Span<double> output) => Compute(theta, original: false, output);

    /// <summary>The roots; on the original data each refined from the middle of its step (as <see cref="InversePrediction"/>), on a resample from the full-data root.</summary>
    private ResampleFailure Compute(ReadOnlySpan<double> theta, bool original, Span<double> output)
    {
        theta.CopyTo(_theta);
        _model.EvaluateBatch(_theta, _grid, _rows, _values, _batchScratch);
        for (var d = 0; d < _responses.Length; d++)
        {
            var y0 = _responses[d];
            for (var k = 0; k < Points; k++)
            {
                _gaps[k] = _values[k] - y0;
            }

            var roots = InverseRoot.CountRoots(_gaps, out var step);
            if (roots != 1)
            {
                return roots == 0 ? ResampleFailure.NoRootInRange : ResampleFailure.SeveralRoots;
            }

            var curve = new Curve(this, y0);
            var a = _grid[Math.Max(step - 1, 0)];
            var b = _grid[step];
            var start = original ? a + ((b - a) / 2) : _roots[d];
            var root = InverseRoot.Refine(ref curve, a, b, start);
            if (!double.IsFinite(root))
            {
                return ResampleFailure.NonFinite;
            }

            output[d] = root;
        }

        return ResampleFailure.None;
    }

    private double Value(ModelExpression expression, double x)
    {
        _point[0] = x;
        return expression.EvaluateWithGradient(_theta, _point, _gradient, _scratch);
    }

    private readonly struct Curve(NonlinearInverse owner, double response) : IGapCurve
    {
        public double Gap(double x) => owner.Value(owner._model, x) - response;

        public double Slope(double x) => owner.Value(owner._slope, x);
    }
}
