using System.Collections.Immutable;
using System.Runtime.InteropServices;
using StandFit.Core.Problems;

namespace StandFit.Core.Fitting;

/// <summary>
/// Least squares, ordinary or weighted, for models linear in their parameters, by Householder QR
/// with column pivoting on the centred, scaled and column-equilibrated design matrix; never by
/// normal equations. A weighted fit scales each row of the design and the response by
/// sqrt(w_i) = 1/u_i and solves the same way.
/// <para>
/// Refinement: the QR solution is refined on the augmented system [I X; X' 0] [r; b] = [y; 0]
/// (Björck 1967), whose two residuals y - r - X b and -X' r are taken in double-double from the
/// natural basis, and whose corrections are solved with the same QR factors. Refining the residual
/// vector along with the coefficients is what recovers the coefficients when the residuals are
/// large (NIST StRD Wampler5); refining the coefficients alone stalls there.
/// </para>
/// <para>
/// Memory: every scratch array of a fit (design, QR factors, refinement vectors, covariance
/// intermediates) comes from a workspace owned by the calling thread and reused by its next fit,
/// growing only when a larger fit comes; a fit allocates its <see cref="FitResult"/> and the arrays
/// that result keeps, nothing else. The fitter stays safe to call from several threads at once
/// (each has its own workspace), and it is not re-entered from inside a fit.
/// </para>
/// </summary>
public static class LeastSquaresFitter
{
    /// <summary>A pivot of R smaller than this times the largest is taken as a rank deficiency.</summary>
    public const double RankTolerance = 1e-11;

    private const int RefinementSteps = 3;

    /// <summary>Fits <paramref name="model"/> (of one input) to the points; problems come back as values (reason codes fit.*).</summary>
    public static Result<FitResult> Fit(LinearModel model, ImmutableArray<double> x, ImmutableArray<double> y, string sourceName = "") =>
        Fit(model, new FitData(x, y) { SourceName = sourceName });

    /// <summary>
    /// Whether any fit of <paramref name="model"/> is possible on these inputs: enough points for
    /// error bars, inputs that move, enough distinct points. Null when it is.
    /// </summary>
    public static Problem? CheckFeasible(CurveModel model, FitData data)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(data);
        var hasIntercept = model is not LinearModel linear || linear.HasIntercept;
        var n = data.Count;
        var p = model.ParameterCount;
        var where = SourceLocation.WholeFile(data.SourceName);
        if (n <= p)
        {
            return new Problem(ReasonCodes.FitTooFewPoints.Code, Messages.TooFewPoints(n, p), where);
        }

        for (var k = 0; k < data.InputCount; k++)
        {
            double min = double.PositiveInfinity, max = double.NegativeInfinity;
            foreach (var v in data.Inputs[k])
            {
                min = Math.Min(min, v);
                max = Math.Max(max, v);
            }

            if ((hasIntercept && min == max) || (!hasIntercept && min == 0 && max == 0))
            {
                return new Problem(
                    ReasonCodes.FitZeroStimulusSpread.Code,
                    data.InputCount == 1 ? Messages.ZeroStimulusSpread(min) : Messages.ZeroInputSpread(data.InputName(k), min),
                    where);
            }
        }

        var distinct = CountDistinctPoints(data.Inputs, Workspace.ForThread().Order(n));
        return distinct < p ? new Problem(ReasonCodes.FitRankDeficient.Code, Messages.RankDeficient(distinct, p), where) : null;
    }

    /// <summary>Fits <paramref name="model"/> to the points; problems come back as values (reason codes fit.* and input.bad_uncertainty).</summary>
    public static Result<FitResult> Fit(LinearModel model, FitData data)
    {
        if (data.InputCount != model.InputCount)
        {
            throw new ArgumentException(model.Name + " takes " + model.InputCount + " input(s); the data have " + data.InputCount + ".", nameof(data));
        }

        var n = data.Count;
        var p = model.ParameterCount;
        var m = data.InputCount;
        if (CheckFeasible(model, data) is { } infeasible)
        {
            return infeasible;
        }

        var work = Workspace.ForThread();
        work.Ensure(n, p, m);

        // Row scales 1/u_i of a weighted fit.
        var rowScale = work.RowScale.AsSpan(0, n);
        for (var i = 0; i < n; i++)
        {
            if (!data.IsWeighted)
            {
                rowScale[i] = 1.0;
                continue;
            }

            var u = data.Uncertainties[i];
            if (!(u > 0) || !double.IsFinite(u) || !double.IsFinite(1.0 / u))
            {
                return new Problem(ReasonCodes.InputBadUncertainty.Code, Messages.BadUncertainty(u), At(data, i));
            }

            // The response's uncertainty (a model fitting 1/T turns u(T) into u(T) / T^2); an
            // output outside the transform's domain is reported below as fit.domain.
            var uResponse = model.CheckResponse(data.Output[i]) is null ? model.TransformUncertainty(data.Output[i], u) : u;
            rowScale[i] = 1.0 / uResponse;
            if (!(uResponse > 0) || !double.IsFinite(rowScale[i]))
            {
                return new Problem(ReasonCodes.InputBadUncertainty.Code, Messages.BadUncertainty(uResponse), At(data, i));
            }
        }

        // The response, and the model's domain at every point.
        var y = new double[n];
        var point = work.Point.AsSpan(0, m);
        for (var i = 0; i < n; i++)
        {
            var output = data.Output[i];
            if (model.CheckResponse(output) is { } responseCondition)
            {
                return new Problem(ReasonCodes.FitDomain.Code, Messages.ResponseOutsideDomain(output, responseCondition), At(data, i));
            }

            y[i] = model.TransformResponse(output);
            Gather(data.Inputs, i, point);
            if (model.CheckDomain(point) is { } violation)
            {
                return new Problem(
                    ReasonCodes.FitDomain.Code,
                    Messages.OutsideDomain(data.InputName(violation.Input), BasisTerm.InputSymbols(m)[violation.Input], point[violation.Input], violation.Condition),
                    At(data, i));
            }
        }

        var min = new double[m];
        var max = new double[m];
        for (var k = 0; k < m; k++)
        {
            min[k] = double.PositiveInfinity;
            max[k] = double.NegativeInfinity;
            foreach (var v in data.Inputs[k])
            {
                min[k] = Math.Min(min[k], v);
                max[k] = Math.Max(max[k], v);
            }
        }

        var scaling = model.ChooseScaling(min, max);

        // The weighted, scaled design, column-major, then every column equilibrated to unit norm.
        var design = work.Design.AsSpan(0, n * p);
        var row = work.Row.AsSpan(0, p);
        for (var i = 0; i < n; i++)
        {
            Gather(data.Inputs, i, point);
            model.FillScaledBasis(point, scaling, row);
            for (var j = 0; j < p; j++)
            {
                design[(j * n) + i] = rowScale[i] * row[j];
            }
        }

        var where = SourceLocation.WholeFile(data.SourceName);
        if (!AllFinite(design) || !AllFinite(y))
        {
            return new Problem(ReasonCodes.FitNonFinite.Code, Messages.NonFiniteFit(), where);
        }

        var columnScale = work.ColumnScale.AsSpan(0, p);
        for (var j = 0; j < p; j++)
        {
            var column = design.Slice(j * n, n);
            var norm = 0.0;
            foreach (var v in column)
            {
                norm += v * v;
            }

            norm = Math.Sqrt(norm);
            if (!(norm > 0) || !double.IsFinite(norm))
            {
                return norm > 0
                    ? new Problem(ReasonCodes.FitNonFinite.Code, Messages.NonFiniteFit(), where)
                    : new Problem(ReasonCodes.FitRankDeficient.Code, Messages.Collinear(p), where);
            }

            columnScale[j] = norm;
            foreach (ref var v in column)
            {
                v /= norm;
            }
        }

        var qr = work.Qr;
        qr.Factor(design, n, p);
        var largestPivot = Math.Abs(qr.R(0, 0));
        for (var k = 0; k < p; k++)
        {
            if (!(Math.Abs(qr.R(k, k)) > RankTolerance * largestPivot))
            {
                return new Problem(ReasonCodes.FitRankDeficient.Code, Messages.Collinear(p), where);
            }
        }

        // Coefficients c on the equilibrated basis, then b = T D^-1 c on the natural one.
        var qty = work.Qty.AsSpan(0, n);
        for (var i = 0; i < n; i++)
        {
            qty[i] = rowScale[i] * y[i];
        }

        qr.ApplyQTranspose(qty);
        var solution = work.Solution.AsSpan(0, p);
        qty[..p].CopyTo(solution);
        qr.SolveUpper(solution);
        var a = work.Coefficients.AsSpan(0, p);
        for (var k = 0; k < p; k++)
        {
            var j = qr.Permutation(k);
            a[j] = solution[k] / columnScale[j];
        }

        var map = work.Map.AsSpan(0, p * p);
        model.FillNaturalMap(scaling, map);
        var estimates = new double[p];
        MapToNatural(map, a, p, estimates);

        Refine(model, data, y, rowScale, qr, columnScale, map, estimates, point, work);

        // Raw and weighted residuals of the refined natural coefficients, each rounded once.
        var residuals = new double[n];
        var weightedResiduals = new double[n];
        var fitted = new double[n];
        var rss = 0.0;
        for (var i = 0; i < n; i++)
        {
            Gather(data.Inputs, i, point);
            var value = model.EvaluatePrecise(estimates, point);
            residuals[i] = DoubleDouble.Subtract(y[i], value);
            weightedResiduals[i] = ((-value + y[i]) * rowScale[i]).ToDouble();
            fitted[i] = y[i] - residuals[i];
            rss += weightedResiduals[i] * weightedResiduals[i];
        }

        var weights = new double[n];
        double sumW = 0, sumWy = 0;
        for (var i = 0; i < n; i++)
        {
            weights[i] = rowScale[i] * rowScale[i];
            sumW += weights[i];
            sumWy += weights[i] * y[i];
        }

        var mean = sumWy / sumW;
        var tss = 0.0;
        for (var i = 0; i < n; i++)
        {
            var d = model.HasIntercept ? y[i] - mean : y[i];
            tss += weights[i] * d * d;
        }

        // Covariance: s^2 R^-1 R^-T on the pivoted, equilibrated basis, then unscaled and mapped.
        var df = n - p;
        var s2 = rss / df;
        var rInverse = work.InverseR.AsSpan(0, p * p);
        qr.InverseR(rInverse);
        var covScaled = work.CovarianceScaled.AsSpan(0, p * p);
        for (var k = 0; k < p; k++)
        {
            for (var l = 0; l < p; l++)
            {
                var sum = 0.0;
                for (var mm = Math.Max(k, l); mm < p; mm++)
                {
                    sum += rInverse[(k * p) + mm] * rInverse[(l * p) + mm];
                }

                var jk = qr.Permutation(k);
                var jl = qr.Permutation(l);
                covScaled[(jk * p) + jl] = s2 * sum / (columnScale[jk] * columnScale[jl]);
            }
        }

        var covariance = new double[p * p];
        Sandwich(map, covScaled, p, work.SandwichTemp.AsSpan(0, p * p), covariance);

        // Leverage: squared row norms of the thin Q.
        var q = work.ThinQ.AsSpan(0, n * p);
        qr.ThinQ(q);
        var leverage = new double[n];
        for (var i = 0; i < n; i++)
        {
            var h = 0.0;
            for (var k = 0; k < p; k++)
            {
                h += q[(k * n) + i] * q[(k * n) + i];
            }

            leverage[i] = h;
        }

        var rMatrix = work.RMatrix.AsSpan(0, p * p);
        rMatrix.Clear();
        for (var i = 0; i < p; i++)
        {
            for (var j = i; j < p; j++)
            {
                rMatrix[(i * p) + j] = qr.R(i, j);
            }
        }

        var condition = SingularValues.ConditionNumber(rMatrix, p, work.SvdScratch.AsSpan(0, p * p));
        if (!AllFinite(estimates) || !AllFinite(covariance) || !double.IsFinite(rss) || !AllFinite(residuals))
        {
            return new Problem(ReasonCodes.FitNonFinite.Code, Messages.NonFiniteFit(), where);
        }

        return new FitResult(
            model,
            data,
            Wrap(y),
            Wrap(weights),
            Wrap(estimates),
            Wrap(covariance),
            Wrap(fitted),
            Wrap(residuals),
            Wrap(weightedResiduals),
            Wrap(leverage),
            rss,
            tss,
            condition,
            scaling,
            Wrap(min),
            Wrap(max));
    }

    /// <summary>
    /// Iterative refinement on the augmented system of the weighted problem, in place on
    /// <paramref name="estimates"/>. With the equilibrated design E = X T D^-1 factored as E P = Q R,
    /// the corrections of [I E; E' 0] [dr; dc] = [f; g] are h = R^-T P' g, d = Q' f,
    /// dc = P R^-1 (d1 - h), dr = Q [h; d2] (Björck 1967); f = y - r - X b and g = -E' r come from
    /// the natural basis in double-double.
    /// </summary>
    private static void Refine(LinearModel model, FitData data, double[] y, ReadOnlySpan<double> rowScale, HouseholderQr qr, ReadOnlySpan<double> columnScale, ReadOnlySpan<double> map, double[] estimates, Span<double> point, Workspace work)
    {
        var n = y.Length;
        var p = estimates.Length;
        var basis = work.PreciseBasis.AsSpan(0, n * p);
        for (var i = 0; i < n; i++)
        {
            Gather(data.Inputs, i, point);
            model.FillBasisPrecise(point, basis.Slice(i * p, p));
        }

        var r = work.RefineResiduals.AsSpan(0, n);
        for (var i = 0; i < n; i++)
        {
            Gather(data.Inputs, i, point);
            r[i] = ((-model.EvaluatePrecise(estimates, point) + y[i]) * rowScale[i]).ToDouble();
        }

        var f = work.RefineF.AsSpan(0, n);
        var g = work.RefineG.AsSpan(0, p);
        var gE = work.RefineGE.AsSpan(0, p);
        var h = work.RefineH.AsSpan(0, p);
        var z = work.RefineZ.AsSpan(0, p);
        var dr = work.RefineDr.AsSpan(0, n);
        var dc = work.RefineDc.AsSpan(0, p);
        var db = work.RefineDb.AsSpan(0, p);
        for (var step = 0; step < RefinementSteps; step++)
        {
            g.Clear();
            for (var i = 0; i < n; i++)
            {
                Gather(data.Inputs, i, point);
                f[i] = (((-model.EvaluatePrecise(estimates, point) + y[i]) * rowScale[i]) + -r[i]).ToDouble();
                for (var j = 0; j < p; j++)
                {
                    g[j] += -(basis[(i * p) + j] * rowScale[i] * r[i]);
                }
            }

            // g on the equilibrated basis: E' r = D^-1 T' X' r.
            for (var j = 0; j < p; j++)
            {
                var sum = 0.0;
                for (var k = 0; k < p; k++)
                {
                    sum += map[(k * p) + j] * g[k].ToDouble();
                }

                gE[j] = sum / columnScale[j];
            }

            for (var k = 0; k < p; k++)
            {
                h[k] = gE[qr.Permutation(k)];
            }

            qr.SolveUpperTransposed(h);
            f.CopyTo(dr);
            qr.ApplyQTranspose(dr);
            for (var k = 0; k < p; k++)
            {
                z[k] = dr[k] - h[k];
                dr[k] = h[k];
            }

            qr.SolveUpper(z);
            qr.ApplyQ(dr);
            for (var k = 0; k < p; k++)
            {
                var j = qr.Permutation(k);
                dc[j] = z[k] / columnScale[j];
            }

            MapToNatural(map, dc, p, db);
            for (var j = 0; j < p; j++)
            {
                estimates[j] += db[j];
            }

            for (var i = 0; i < n; i++)
            {
                r[i] += dr[i];
            }
        }
    }

    private static SourceLocation At(FitData data, int point)
    {
        var line = data.LineOf(point);
        return line > 0 ? SourceLocation.At(data.SourceName, line) : SourceLocation.WholeFile(data.SourceName);
    }

    private static void Gather(ImmutableArray<ImmutableArray<double>> inputs, int point, Span<double> x)
    {
        for (var k = 0; k < inputs.Length; k++)
        {
            x[k] = inputs[k][point];
        }
    }

    private static void MapToNatural(ReadOnlySpan<double> map, ReadOnlySpan<double> scaled, int p, Span<double> natural)
    {
        for (var i = 0; i < p; i++)
        {
            var sum = 0.0;
            for (var k = 0; k < p; k++)
            {
                sum += map[(i * p) + k] * scaled[k];
            }

            natural[i] = sum;
        }
    }

    private static void Sandwich(ReadOnlySpan<double> map, ReadOnlySpan<double> inner, int p, Span<double> temp, Span<double> result)
    {
        for (var i = 0; i < p; i++)
        {
            for (var j = 0; j < p; j++)
            {
                var sum = 0.0;
                for (var k = 0; k < p; k++)
                {
                    sum += map[(i * p) + k] * inner[(k * p) + j];
                }

                temp[(i * p) + j] = sum;
            }
        }

        for (var i = 0; i < p; i++)
        {
            for (var j = 0; j < p; j++)
            {
                var sum = 0.0;
                for (var k = 0; k < p; k++)
                {
                    sum += temp[(i * p) + k] * map[(j * p) + k];
                }

                result[(i * p) + j] = sum;
            }
        }
    }

    /// <summary>
    /// Number of distinct points (rows of input values): the point indices in <paramref name="order"/>
    /// (n long) are heap-sorted by their rows (lexicographically), then neighbours compared.
    /// </summary>
    private static int CountDistinctPoints(ImmutableArray<ImmutableArray<double>> inputs, Span<int> order)
    {
        var n = inputs[0].Length;
        for (var i = 0; i < n; i++)
        {
            order[i] = i;
        }

        for (var start = (n / 2) - 1; start >= 0; start--)
        {
            SiftDown(inputs, order, start, n);
        }

        for (var end = n - 1; end > 0; end--)
        {
            (order[0], order[end]) = (order[end], order[0]);
            SiftDown(inputs, order, 0, end);
        }

        var count = n == 0 ? 0 : 1;
        for (var i = 1; i < n; i++)
        {
            if (ComparePoints(inputs, order[i], order[i - 1]) != 0)
            {
                count++;
            }
        }

        return count;
    }

    private static void SiftDown(ImmutableArray<ImmutableArray<double>> inputs, Span<int> heap, int root, int length)
    {
        while (true)
        {
            var child = (2 * root) + 1;
            if (child >= length)
            {
                return;
            }

            if (child + 1 < length && ComparePoints(inputs, heap[child + 1], heap[child]) > 0)
            {
                child++;
            }

            if (ComparePoints(inputs, heap[child], heap[root]) <= 0)
            {
                return;
            }

            (heap[root], heap[child]) = (heap[child], heap[root]);
            root = child;
        }
    }

    private static int ComparePoints(ImmutableArray<ImmutableArray<double>> inputs, int a, int b)
    {
        foreach (var column in inputs)
        {
            var c = column[a].CompareTo(column[b]);
            if (c != 0)
            {
                return c;
            }
        }

        return 0;
    }

    private static bool AllFinite(ReadOnlySpan<double> values)
    {
        foreach (var v in values)
        {
            if (!double.IsFinite(v))
            {
                return false;
            }
        }

        return true;
    }

    private static ImmutableArray<double> Wrap(double[] values) => ImmutableCollectionsMarshal.AsImmutableArray(values);

    /// <summary>
    /// The scratch of one thread's fits: every buffer at least as long as the largest fit so far
    /// needed, reused by the next fit on the thread (each fit writes before it reads, so nothing
    /// carries over from one fit to the next).
    /// </summary>
    private sealed class Workspace
    {
        [ThreadStatic]
        private static Workspace? t_current;

        private int _n = -1;
        private int _p = -1;
        private int _m = -1;
        private int[] _order = [];

        public HouseholderQr Qr { get; } = new();

        public double[] RowScale { get; private set; } = [];

        public double[] Point { get; private set; } = [];

        public double[] Design { get; private set; } = [];

        public double[] Row { get; private set; } = [];

        public double[] ColumnScale { get; private set; } = [];

        public double[] Qty { get; private set; } = [];

        public double[] Solution { get; private set; } = [];

        public double[] Coefficients { get; private set; } = [];

        public double[] Map { get; private set; } = [];

        public double[] InverseR { get; private set; } = [];

        public double[] CovarianceScaled { get; private set; } = [];

        public double[] SandwichTemp { get; private set; } = [];

        public double[] ThinQ { get; private set; } = [];

        public double[] RMatrix { get; private set; } = [];

        public double[] SvdScratch { get; private set; } = [];

        public DoubleDouble[] PreciseBasis { get; private set; } = [];

        public double[] RefineResiduals { get; private set; } = [];

        public double[] RefineF { get; private set; } = [];

        public DoubleDouble[] RefineG { get; private set; } = [];

        public double[] RefineGE { get; private set; } = [];

        public double[] RefineH { get; private set; } = [];

        public double[] RefineZ { get; private set; } = [];

        public double[] RefineDr { get; private set; } = [];

        public double[] RefineDc { get; private set; } = [];

        public double[] RefineDb { get; private set; } = [];

        public static Workspace ForThread() => t_current ??= new Workspace();

        /// <summary>An index buffer of at least <paramref name="n"/> entries.</summary>
        public Span<int> Order(int n)
        {
            if (_order.Length < n)
            {
                _order = new int[n];
            }

            return _order.AsSpan(0, n);
        }

        /// <summary>Grows the buffers to hold a fit of n points, p parameters and m inputs.</summary>
        public void Ensure(int n, int p, int m)
        {
            if (n <= _n && p <= _p && m <= _m)
            {
                return;
            }

            _n = Math.Max(n, _n);
            _p = Math.Max(p, _p);
            _m = Math.Max(m, _m);
            (n, p, m) = (_n, _p, _m);
            RowScale = new double[n];
            Point = new double[m];
            Design = new double[n * p];
            Row = new double[p];
            ColumnScale = new double[p];
            Qty = new double[n];
            Solution = new double[p];
            Coefficients = new double[p];
            Map = new double[p * p];
            InverseR = new double[p * p];
            CovarianceScaled = new double[p * p];
            SandwichTemp = new double[p * p];
            ThinQ = new double[n * p];
            RMatrix = new double[p * p];
            SvdScratch = new double[p * p];
            PreciseBasis = new DoubleDouble[n * p];
            RefineResiduals = new double[n];
            RefineF = new double[n];
            RefineG = new DoubleDouble[p];
            RefineGE = new double[p];
            RefineH = new double[p];
            RefineZ = new double[p];
            RefineDr = new double[n];
            RefineDc = new double[p];
            RefineDb = new double[p];
        }
    }
}
