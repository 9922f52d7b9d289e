using System.Collections.Immutable;
using System.Runtime.InteropServices;
using StandFit.Core.Problems;

namespace StandFit.Core.Fitting;

/// <summary>
/// Ordinary least squares for models linear in their parameters, by Householder QR with column
/// pivoting on the centred, scaled and column-equilibrated design matrix; never by normal equations.
/// </summary>
public static class LeastSquaresFitter
{
    /// <summary>A pivot of R smaller than this times the largest is taken as a rank deficiency.</summary>
    public const double RankTolerance = 1e-11;

    private const int RefinementSteps = 2;

    /// <summary>
    /// Whether any fit of <paramref name="model"/> is possible on these stimulus values: enough points
    /// for error bars, a stimulus that moves, enough distinct set points. Null when it is.
    /// </summary>
    public static Problem? CheckFeasible(LinearModel model, ImmutableArray<double> x, string sourceName = "")
    {
        var n = x.Length;
        var p = model.ParameterCount;
        var where = SourceLocation.WholeFile(sourceName);
        if (n <= p)
        {
            return new Problem(ReasonCodes.FitTooFewPoints.Code, Messages.TooFewPoints(n, p), where);
        }

        double min = double.PositiveInfinity, max = double.NegativeInfinity;
        foreach (var v in x)
        {
            min = Math.Min(min, v);
            max = Math.Max(max, v);
        }

        if ((model.HasIntercept && min == max) || (!model.HasIntercept && min == 0 && max == 0))
        {
            return new Problem(ReasonCodes.FitZeroStimulusSpread.Code, Messages.ZeroStimulusSpread(min), where);
        }

        var distinct = CountDistinct(x);
        return distinct < p ? new Problem(ReasonCodes.FitRankDeficient.Code, Messages.RankDeficient(distinct, p), where) : null;
    }

    /// <summary>Fits <paramref name="model"/> to the points; problems come back as values (reason codes fit.*).</summary>
    public static Result<FitResult> Fit(LinearModel model, ImmutableArray<double> x, ImmutableArray<double> y, string sourceName = "")
    {
        if (x.Length != y.Length)
        {
            throw new ArgumentException("Stimulus and output need the same number of points.");
        }

        if (CheckFeasible(model, x, sourceName) is { } infeasible)
        {
            return infeasible;
        }

        var n = x.Length;
        var p = model.ParameterCount;
        var where = SourceLocation.WholeFile(sourceName);
        double min = double.PositiveInfinity, max = double.NegativeInfinity;
        foreach (var v in x)
        {
            min = Math.Min(min, v);
            max = Math.Max(max, v);
        }

        var distinct = CountDistinct(x);

        var scaling = model.ChooseScaling(min, max);
        var basis = new double[n * p]; // column-major
        var row = new double[p];
        for (var i = 0; i < n; i++)
        {
            model.FillBasis((x[i] - scaling.Centre) / scaling.HalfRange, row);
            for (var j = 0; j < p; j++)
            {
                basis[(j * n) + i] = row[j];
            }
        }

        // Column equilibration: every column of unit norm.
        var columnScale = new double[p];
        var equilibrated = new double[n * p];
        for (var j = 0; j < p; j++)
        {
            var column = basis.AsSpan(j * n, n);
            var norm = 0.0;
            foreach (var v in column)
            {
                norm += v * v;
            }

            norm = Math.Sqrt(norm);
            columnScale[j] = norm;
            for (var i = 0; i < n; i++)
            {
                equilibrated[(j * n) + i] = column[i] / norm;
            }
        }

        var qr = new HouseholderQr(equilibrated, n, p);
        var largestPivot = Math.Abs(qr.R(0, 0));
        for (var k = 0; k < p; k++)
        {
            if (!(Math.Abs(qr.R(k, k)) > RankTolerance * largestPivot))
            {
                return new Problem(ReasonCodes.FitRankDeficient.Code, Messages.RankDeficient(distinct, p), where);
            }
        }

        // Coefficients on the scaled basis.
        var qty = y.ToArray();
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

        // Iterative refinement on the natural scale: the map from the scaled coefficients can cancel
        // digits (a polynomial far from the origin), so residuals of the natural coefficients are
        // taken in double-double and their least-squares correction, solved with the same QR, is
        // added back. Two steps are enough to reach the data's own accuracy.
        var residuals = new double[n];
        var correction = new double[n];
        var delta = new double[p];
        for (var step = 0; step < RefinementSteps; step++)
        {
            NaturalResiduals(model, estimates, x, y, residuals);
            residuals.CopyTo(correction, 0);
            qr.ApplyQTranspose(correction);
            var solved = correction.AsSpan(0, p);
            qr.SolveUpper(solved);
            for (var k = 0; k < p; k++)
            {
                var j = qr.Permutation(k);
                delta[j] = solved[k] / columnScale[j];
            }

            var deltaNatural = MapToNatural(map, delta, p);
            for (var j = 0; j < p; j++)
            {
                estimates[j] += deltaNatural[j];
            }
        }

        NaturalResiduals(model, estimates, x, y, residuals);
        var fitted = new double[n];
        var rss = 0.0;
        var mean = 0.0;
        foreach (var v in y)
        {
            mean += v;
        }

        mean /= n;
        var tss = 0.0;
        for (var i = 0; i < n; i++)
        {
            fitted[i] = y[i] - residuals[i];
            rss += residuals[i] * residuals[i];
            var d = model.HasIntercept ? y[i] - mean : y[i];
            tss += d * d;
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
                for (var m = Math.Max(k, l); m < p; m++)
                {
                    sum += rInverse[(k * p) + m] * rInverse[(l * p) + m];
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
        if (!AllFinite(estimates) || !AllFinite(covariance) || !double.IsFinite(rss))
        {
            return new Problem(ReasonCodes.FitNonFinite.Code, Messages.NonFiniteFit(), where);
        }

        return new FitResult(
            model,
            x,
            y,
            Wrap(estimates),
            Wrap(covariance),
            Wrap(fitted),
            Wrap(residuals),
            Wrap(leverage),
            rss,
            tss,
            condition,
            scaling);
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

    /// <summary>y - f(x; b) per point, with f evaluated in double-double and the difference rounded once.</summary>
    private static void NaturalResiduals(LinearModel model, double[] estimates, ImmutableArray<double> x, ImmutableArray<double> y, double[] residuals)
    {
        for (var i = 0; i < x.Length; i++)
        {
            residuals[i] = DoubleDouble.Subtract(y[i], model.EvaluatePrecise(estimates, x[i]));
        }
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

    private static int CountDistinct(ImmutableArray<double> x)
    {
        var sorted = x.ToArray();
        Array.Sort(sorted);
        var count = sorted.Length == 0 ? 0 : 1;
        for (var i = 1; i < sorted.Length; i++)
        {
            if (sorted[i] != sorted[i - 1])
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
