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

        var distinct = CountDistinctPoints(data.Inputs);
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
        var where = SourceLocation.WholeFile(data.SourceName);
        if (CheckFeasible(model, data) is { } infeasible)
        {
            return infeasible;
        }

        // Row scales 1/u_i of a weighted fit.
        var rowScale = new double[n];
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
        var point = new double[m];
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

        var distinct = CountDistinctPoints(data.Inputs);

        var scaling = model.ChooseScaling(min, max);

        // The weighted, scaled design, column-major, then every column equilibrated to unit norm.
        var design = new double[n * p];
        var row = new double[p];
        for (var i = 0; i < n; i++)
        {
            Gather(data.Inputs, i, point);
            model.FillScaledBasis(point, scaling, row);
            for (var j = 0; j < p; j++)
            {
                design[(j * n) + i] = rowScale[i] * row[j];
            }
        }

        if (!AllFinite(design) || !AllFinite(y))
        {
            return new Problem(ReasonCodes.FitNonFinite.Code, Messages.NonFiniteFit(), where);
        }

        var columnScale = new double[p];
        for (var j = 0; j < p; j++)
        {
            var column = design.AsSpan(j * n, n);
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

        var qr = new HouseholderQr(design, n, p);
        var largestPivot = Math.Abs(qr.R(0, 0));
        for (var k = 0; k < p; k++)
        {
            if (!(Math.Abs(qr.R(k, k)) > RankTolerance * largestPivot))
            {
                return new Problem(ReasonCodes.FitRankDeficient.Code, Messages.Collinear(p), where);
            }
        }

        // Coefficients c on the equilibrated basis, then b = T D^-1 c on the natural one.
        var weighted = new double[n];
        for (var i = 0; i < n; i++)
        {
            weighted[i] = rowScale[i] * y[i];
        }

        var qty = (double[])weighted.Clone();
        qr.ApplyQTranspose(qty);
        var solution = qty.AsSpan(0, p).ToArray();
        qr.SolveUpper(solution);
        var a = new double[p];
        for (var k = 0; k < p; k++)
        {
            var j = qr.Permutation(k);
            a[j] = solution[k] / columnScale[j];
        }

        var map = new double[p * p];
        model.FillNaturalMap(scaling, map);
        var estimates = MapToNatural(map, a, p);

        Refine(model, data, y, rowScale, qr, columnScale, map, estimates, point);

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
        var rInverse = qr.InverseR();
        var covScaled = new double[p * p];
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

        var covariance = Sandwich(map, covScaled, p);

        // Leverage: squared row norms of the thin Q.
        var q = qr.ThinQ();
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

        var rMatrix = new double[p * p];
        for (var i = 0; i < p; i++)
        {
            for (var j = i; j < p; j++)
            {
                rMatrix[(i * p) + j] = qr.R(i, j);
            }
        }

        var condition = SingularValues.ConditionNumber(rMatrix, p);
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
    private static void Refine(LinearModel model, FitData data, double[] y, double[] rowScale, HouseholderQr qr, double[] columnScale, double[] map, double[] estimates, double[] point)
    {
        var n = y.Length;
        var p = estimates.Length;
        var basis = new DoubleDouble[n * p];
        for (var i = 0; i < n; i++)
        {
            Gather(data.Inputs, i, point);
            model.FillBasisPrecise(point, basis.AsSpan(i * p, p));
        }

        var r = new double[n];
        for (var i = 0; i < n; i++)
        {
            Gather(data.Inputs, i, point);
            r[i] = ((-model.EvaluatePrecise(estimates, point) + y[i]) * rowScale[i]).ToDouble();
        }

        var f = new double[n];
        var g = new DoubleDouble[p];
        var gE = new double[p];
        var h = new double[p];
        var z = new double[p];
        var dr = new double[n];
        var dc = new double[p];
        for (var step = 0; step < RefinementSteps; step++)
        {
            Array.Clear(g);
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
            f.CopyTo(dr, 0);
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

            var db = MapToNatural(map, dc, p);
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

    private static double[] MapToNatural(double[] map, double[] scaled, int p)
    {
        var natural = new double[p];
        for (var i = 0; i < p; i++)
        {
            var sum = 0.0;
            for (var k = 0; k < p; k++)
            {
                sum += map[(i * p) + k] * scaled[k];
            }

            natural[i] = sum;
        }

        return natural;
    }

    private static double[] Sandwich(double[] map, double[] inner, int p)
    {
        var temp = new double[p * p];
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

        var result = new double[p * p];
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

        return result;
    }

    /// <summary>Number of distinct points (rows of input values).</summary>
    private static int CountDistinctPoints(ImmutableArray<ImmutableArray<double>> inputs)
    {
        var n = inputs[0].Length;
        var order = Enumerable.Range(0, n).ToArray();
        Array.Sort(order, (a, b) =>
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
        });
        var count = n == 0 ? 0 : 1;
        for (var i = 1; i < n; i++)
        {
            if (inputs.Any(column => column[order[i]] != column[order[i - 1]]))
            {
                count++;
            }
        }

        return count;
    }

    private static bool AllFinite(double[] values)
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
}
