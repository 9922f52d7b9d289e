using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using StandFit.Core.Fitting;

namespace StandFit.Core.Uncertainty.Resampling;

/// <summary>Why a resample could not be fitted.</summary>
public enum ResampleFailure
{
    None,

    /// <summary>The points drawn have no stimulus spread (one set point, or only zero for a model without offset).</summary>
    DegenerateStimulus,

    /// <summary>The points drawn have too few distinct set points to separate the parameters.</summary>
    RankDeficient,

    /// <summary>The refit gave a non-finite number.</summary>
    NonFinite,

    /// <summary>A nonlinear refit: the Levenberg-Marquardt search reached its iteration limit (the recipe's <c>max_iterations</c>) without converging.</summary>
    NotConverged,

    /// <summary>A nonlinear refit converged onto one of the recipe's parameter bounds: a constrained estimate, not a least-squares one.</summary>
    AtBound,

    /// <summary>The refitted curve gives an inverse_at figure's output nowhere in the calibrated range (no step of the grid holds a root).</summary>
    NoRootInRange,

    /// <summary>The refitted curve gives an inverse_at figure's output at more than one stimulus in the calibrated range (not monotonic there).</summary>
    SeveralRoots,
}

/// <summary>
/// Counts of one bootstrap run: resamples asked for, fitted, and failed by cause (not converged and
/// at a bound only for a nonlinear model; no root and several roots only with inverse_at figures).
/// </summary>
public readonly record struct BootstrapCounts(int Requested, int Succeeded, int DegenerateStimulus, int RankDeficient, int NonFinite, int NotConverged = 0, int AtBound = 0, int NoRootInRange = 0, int SeveralRoots = 0)
{
    public int Failed => DegenerateStimulus + RankDeficient + NonFinite + NotConverged + AtBound + NoRootInRange + SeveralRoots;

    /// <summary>The counts with one more failure of <paramref name="cause"/> (not <see cref="ResampleFailure.None"/>).</summary>
    internal BootstrapCounts With(ResampleFailure cause) => cause switch
    {
        ResampleFailure.DegenerateStimulus => this with { DegenerateStimulus = DegenerateStimulus + 1 },
        ResampleFailure.RankDeficient => this with { RankDeficient = RankDeficient + 1 },
        ResampleFailure.NotConverged => this with { NotConverged = NotConverged + 1 },
        ResampleFailure.AtBound => this with { AtBound = AtBound + 1 },
        ResampleFailure.NoRootInRange => this with { NoRootInRange = NoRootInRange + 1 },
        ResampleFailure.SeveralRoots => this with { SeveralRoots = SeveralRoots + 1 },
        _ => this with { NonFinite = NonFinite + 1 },
    };
}

/// <summary>
/// Jackknife and bootstrap refits of a model linear in its parameters, fast enough for every unit.
/// Everything that does not change between resamples is computed once from the fit: the thin Q of
/// the Householder QR of the centred, scaled and equilibrated design (the fitter's own basis), the
/// map M from Q coordinates to the natural parameters (M = T D^-1 P R^-1), and per point the
/// products q_i q_i' and q_i e_i. A resample that gives point i the weight w_i (its count in a
/// pairs resample, 0 or 1 in a jackknife) then has the estimates
/// <code>b* = b_hat + M (Q' W Q)^-1 Q' W e</code>
/// exactly (e are the fit's residuals, b_hat its refined estimates): only the p x p matrix Q'WQ,
/// which is the identity for the original sample, is factorised (Cholesky) per resample. It is
/// never X'X: its condition number measures how unevenly the resample weights the points, not the
/// design's conditioning, which the QR has already dealt with. For the residual and wild schemes
/// the design is fixed, W = I, and b* = b_hat + M Q' e* needs no factorisation at all. An
/// inverse_at figure is the root of each resample's curve f(x; b*) = y0 (<see cref="LinearInverse"/>);
/// a resample without exactly one root in the calibrated range fails. No allocation happens per
/// resample; the caller provides the output buffers.
/// </summary>
public sealed class LinearResampler : IResampler
{
    /// <summary>A Cholesky pivot of Q'WQ at or below this fraction of its diagonal entry is a rank deficiency.</summary>
    public const double PivotTolerance = 1e-12;

    private readonly int _n;
    private readonly int _p;
    private readonly int _f;
    private readonly int _fLinear;         // figures that are linear in b (the rest are inverse_at roots)
    private readonly LinearInverse? _inverse;
    private readonly int _stride;          // p(p+1)/2 + p
    private readonly int _triangle;        // p(p+1)/2
    private readonly double[] _q;          // n x p row-major: thin Q
    private readonly int _strideV;         // stride rounded up to a multiple of 4
    private readonly double[] _packRows;   // n x strideV: each point's pack, zero padded (vector path, p <= 4)
    private readonly double[] _qRows;      // n x 4: each point's q_i, zero padded (vector path, p <= 4)
    private readonly int _nPad;            // n rounded up to a multiple of 4 (one Vector256 of doubles)
    private readonly double[] _packT;      // stride x nPad: component t of every point's pack (upper triangle of q_i q_i' row by row, then q_i e_i), zero padded
    private readonly double[] _figureMap;  // f x p row-major: F M, figure changes per unit of Q coordinate
    private readonly double[] _estimates;  // f: figure values on the original data
    private readonly double[] _stimulus;
    private readonly double[] _fitted;
    private readonly double[] _residuals;
    private readonly double[] _adjusted;   // e_i / sqrt(1 - h_ii), 0 where h_ii = 1
    private readonly double[] _centred;    // _adjusted minus its mean
    private readonly bool _intercept;

    /// <param name="fit">The fit on the original data.</param>
    /// <param name="figureGradients">f x p row-major: figure k = row k . b (a parameter is a unit row; a derived figure its gradient).</param>
    /// <param name="inverseResponses">
    /// y0 of each inverse_at figure, resampled after the figures of <paramref name="figureGradients"/>:
    /// the root of each resample's curve (<see cref="LinearInverse"/>); each must be solved on the fit
    /// (<see cref="Curve.InversePrediction.RootOf"/>). Only for a model of one input.
    /// </param>
    public LinearResampler(FitResult fit, ReadOnlySpan<double> figureGradients, ReadOnlySpan<double> inverseResponses = default)
    {
        ArgumentNullException.ThrowIfNull(fit);
        _n = fit.Count;
        _p = fit.ParameterCount;
        if (figureGradients.Length == 0 || figureGradients.Length % _p != 0)
        {
            throw new ArgumentException("Figure gradients are f x p, row-major.", nameof(figureGradients));
        }

        _fLinear = figureGradients.Length / _p;
        _f = _fLinear + inverseResponses.Length;
        if (!inverseResponses.IsEmpty && fit.InputCount != 1)
        {
            throw new ArgumentException("inverse_at figures are resampled for a model of one input.", nameof(inverseResponses));
        }

        _triangle = _p * (_p + 1) / 2;
        _stride = _triangle + _p;
        _intercept = fit.Model.HasIntercept;
        _stimulus = fit.Stimulus.ToArray();
        _fitted = fit.Fitted.ToArray();
        // A weighted fit is resampled in its whitened coordinates: rows and residuals scaled by sqrt(w)
        // (for an unweighted fit the weighted residuals are the residuals).
        _residuals = fit.WeightedResiduals.ToArray();

        var (q, m) = Factorise(fit);
        _q = q;

        _figureMap = new double[_fLinear * _p];
        _estimates = new double[_f];
        for (var k = 0; k < _fLinear; k++)
        {
            var g = figureGradients.Slice(k * _p, _p);
            var value = 0.0;
            for (var j = 0; j < _p; j++)
            {
                value += g[j] * fit.Estimates[j];
            }

            _estimates[k] = value;
            for (var c = 0; c < _p; c++)
            {
                var sum = 0.0;
                for (var j = 0; j < _p; j++)
                {
                    sum += g[j] * m[(j * _p) + c];
                }

                _figureMap[(k * _p) + c] = sum;
            }
        }

        if (!inverseResponses.IsEmpty)
        {
            _inverse = new LinearInverse(fit, m, inverseResponses);
            for (var d = 0; d < _inverse.Count; d++)
            {
                _estimates[_fLinear + d] = _inverse.Estimate(d);
            }
        }

        _nPad = (_n + 3) & ~3;
        _packT = new double[_stride * _nPad];
        for (var i = 0; i < _n; i++)
        {
            var row = _q.AsSpan(i * _p, _p);
            var t = 0;
            for (var j = 0; j < _p; j++)
            {
                for (var k = j; k < _p; k++)
                {
                    _packT[(t++ * _nPad) + i] = row[j] * row[k];
                }
            }

            for (var j = 0; j < _p; j++)
            {
                _packT[((_triangle + j) * _nPad) + i] = row[j] * _residuals[i];
            }
        }

        _strideV = (_stride + 3) & ~3;
        _packRows = new double[_n * _strideV];
        _qRows = new double[_n * 4];
        for (var i = 0; i < _n; i++)
        {
            for (var t = 0; t < _stride; t++)
            {
                _packRows[(i * _strideV) + t] = _packT[(t * _nPad) + i];
            }

            for (var c = 0; c < Math.Min(_p, 4); c++)
            {
                _qRows[(i * 4) + c] = _q[(i * _p) + c];
            }
        }

        _adjusted = new double[_n];
        _centred = new double[_n];
        ResampleDraws.Adjust(_residuals, fit.Leverage.AsSpan(), _adjusted, _centred);
    }

    public int Points => _n;

    public int Parameters => _p;

    public int Figures => _f;

    /// <summary>The figures on the original data.</summary>
    public ReadOnlySpan<double> Estimates => _estimates;

    /// <summary>The leverage-adjusted residuals e_i / sqrt(1 - h_ii) (0 for a point of leverage 1), before centring.</summary>
    public ReadOnlySpan<double> AdjustedResiduals => _adjusted;

    /// <summary>
    /// The figures with each group left out in turn: <paramref name="groupOf"/> gives each point's
    /// group (0 .. groups - 1; for delete-one, the point's own index). Writes figure k of leave-out g
    /// to <c>output[k * groups + g]</c> and the cause of any failure to <c>failures[g]</c>.
    /// </summary>
    public void LeaveOut(ReadOnlySpan<int> groupOf, int groups, Span<double> output, Span<ResampleFailure> failures)
    {
        if (groupOf.Length != _n || output.Length < _f * groups || failures.Length < groups)
        {
            throw new ArgumentException("Leave-out buffers do not match the fit.");
        }

        Span<double> acc = stackalloc double[_stride];
        Span<double> work = stackalloc double[(_p * _p) + _p];
        Span<double> figures = stackalloc double[_f];
        Span<double> coords = stackalloc double[_p];
        var weights = new double[_nPad];
        for (var g = 0; g < groups; g++)
        {
            for (var i = 0; i < _n; i++)
            {
                weights[i] = groupOf[i] != g ? 1.0 : 0.0;
            }

            Accumulate(weights, acc);
            var failure = Solve(acc, work, figures, coords);
            if (failure == ResampleFailure.RankDeficient)
            {
                failure = Classify(weights);
            }
            else if (failure == ResampleFailure.None && _inverse is not null)
            {
                failure = _inverse.Compute(coords, figures[_fLinear..]);
            }

            failures[g] = failure;
            for (var k = 0; k < _f; k++)
            {
                output[(k * groups) + g] = failure == ResampleFailure.None ? figures[k] : double.NaN;
            }
        }
    }

    /// <summary>
    /// Draws <paramref name="resamples"/> bootstrap resamples of the chosen scheme from
    /// <paramref name="rng"/> and refits each. Figure k of the s-th successful resample goes to
    /// <c>output[k * resamples + s]</c>; failed resamples are counted, not written. When
    /// <paramref name="recordIndices"/> is not empty (resamples x n), the drawn point indices (pairs)
    /// or residual indices (residual) are written there, one resample per row.
    /// </summary>
    public BootstrapCounts Bootstrap(BootstrapScheme scheme, int resamples, ref Xoshiro256StarStar rng, Span<double> output, Span<int> recordIndices = default)
    {
        ResampleDraws.CheckBootstrapBuffers(_f, _n, resamples, output, recordIndices);

        return scheme switch
        {
            BootstrapScheme.Pairs => Pairs(resamples, ref rng, output, recordIndices),
            _ => FixedDesign(scheme, resamples, ref rng, output, recordIndices),
        };
    }

    private BootstrapCounts Pairs(int resamples, ref Xoshiro256StarStar rng, Span<double> output, Span<int> recordIndices)
    {
        // The packs in vectors for p <= 4 (stride at most 16); counts and dot products beyond.
        Span<double> acc = stackalloc double[_strideV];
        Span<double> work = stackalloc double[(_p * _p) + _p];
        Span<double> figures = stackalloc double[_f];
        Span<double> coords = stackalloc double[_p];
        var drawn = new int[_n];
        var counts = new double[_nPad];
        var bound = (uint)_n;
        var threshold = Xoshiro256StarStar.RejectionThreshold(_n);
        int good = 0, degenerate = 0, deficient = 0, nonFinite = 0, noRoot = 0, severalRoots = 0;
        var vector = _strideV <= 16;
        for (var r = 0; r < resamples; r++)
        {
            if (vector)
            {
                DrawAndAccumulate(ref rng, drawn, threshold, acc);
            }
            else
            {
                rng.FillBelow(drawn, bound, threshold);
                CountDrawn(drawn, counts);
                Accumulate(counts, acc);
            }

            if (!recordIndices.IsEmpty)
            {
                drawn.CopyTo(recordIndices.Slice(r * _n, _n));
            }

            var failure = Solve(acc, work, figures, coords);
            if (failure == ResampleFailure.RankDeficient)
            {
                CountDrawn(drawn, counts);
                failure = Classify(counts);
            }
            else if (failure == ResampleFailure.None && _inverse is not null)
            {
                failure = _inverse.Compute(coords, figures[_fLinear..]);
            }

            switch (failure)
            {
                case ResampleFailure.None:
                    for (var k = 0; k < _f; k++)
                    {
                        output[(k * resamples) + good] = figures[k];
                    }

                    good++;
                    break;
                case ResampleFailure.DegenerateStimulus:
                    degenerate++;
                    break;
                case ResampleFailure.RankDeficient:
                    deficient++;
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

        return new BootstrapCounts(resamples, good, degenerate, deficient, nonFinite, NoRootInRange: noRoot, SeveralRoots: severalRoots);
    }

    private static void CountDrawn(int[] drawn, double[] counts)
    {
        Array.Clear(counts);
        foreach (var i in drawn)
        {
            counts[i] += 1.0;
        }
    }

    /// <summary>
    /// <see cref="Xoshiro256StarStar.FillBelow"/> and the sum of the drawn points' packs in one loop:
    /// the same draws (two 32-bit words per 64-bit step, the high half first, each by Lemire's
    /// multiply-and-reject; a low half left at the end is discarded) in <paramref name="drawn"/>, and
    /// each accepted point's pack added at once, so the generator's and the additions' dependency
    /// chains overlap. The packs go one to four vectors of four components at a time; even and odd
    /// draws go to two sets of accumulators (to halve the chains of additions), swapped after every
    /// draw and added at the end. A fixed order: the same bits on every machine and thread.
    /// </summary>
    private void DrawAndAccumulate(ref Xoshiro256StarStar rng, int[] drawn, uint threshold, Span<double> acc)
    {
        rng.Save(out var s0, out var s1, out var s2, out var s3);
        ref var rows = ref MemoryMarshal.GetArrayDataReference(_packRows);
        ref var indices = ref MemoryMarshal.GetArrayDataReference(drawn);
        var bound = (ulong)_n;
        var sv = _strideV;
        var vectors = sv / 4;
        Vector256<double> a0 = default, a1 = default, a2 = default, a3 = default;
        Vector256<double> b0 = default, b1 = default, b2 = default, b3 = default;
        var k = 0;
        var length = drawn.Length;
        while (k < length)
        {
            ulong x;
            unchecked
            {
                x = BitOperations.RotateLeft(s1 * 5, 7) * 9;
                var t = s1 << 17;
                s2 ^= s0;
                s3 ^= s1;
                s1 ^= s2;
                s0 ^= s3;
                s2 ^= t;
                s3 = BitOperations.RotateLeft(s3, 45);
            }

            // The high word, then (shifted up) the low word.
            for (var half = 0; half < 2 && k < length; half++)
            {
                var m = (x >> 32) * bound;
                x <<= 32;
                if ((uint)m < threshold)
                {
                    continue;
                }

                var i = (int)(m >> 32);
                Unsafe.Add(ref indices, k++) = i;
                ref var row = ref Unsafe.Add(ref rows, i * sv);
                a0 += Vector256.LoadUnsafe(ref row);
                (a0, b0) = (b0, a0);
                if (vectors > 1)
                {
                    a1 += Vector256.LoadUnsafe(ref row, 4);
                    (a1, b1) = (b1, a1);
                    if (vectors > 2)
                    {
                        a2 += Vector256.LoadUnsafe(ref row, 8);
                        (a2, b2) = (b2, a2);
                        if (vectors > 3)
                        {
                            a3 += Vector256.LoadUnsafe(ref row, 12);
                            (a3, b3) = (b3, a3);
                        }
                    }
                }
            }
        }

        rng.Restore(s0, s1, s2, s3);

        // Even draws' sum plus odd draws' sum (IEEE addition commutes, so which set holds which does not matter).
        ref var target = ref MemoryMarshal.GetReference(acc);
        (a0 + b0).StoreUnsafe(ref target);
        if (vectors > 1)
        {
            (a1 + b1).StoreUnsafe(ref target, 4);
            if (vectors > 2)
            {
                (a2 + b2).StoreUnsafe(ref target, 8);
                if (vectors > 3)
                {
                    (a3 + b3).StoreUnsafe(ref target, 12);
                }
            }
        }
    }

    /// <summary>
    /// acc[t] = sum_i w_i pack_i[t]: one dot product per component over the zero-padded points, four
    /// lanes at a time, the lanes added in a fixed order (the same bits on every machine and thread).
    /// </summary>
    private void Accumulate(double[] weights, Span<double> acc)
    {
        var w = MemoryMarshal.Cast<double, Vector256<double>>(weights.AsSpan());
        for (var t = 0; t < _stride; t++)
        {
            var column = MemoryMarshal.Cast<double, Vector256<double>>(_packT.AsSpan(t * _nPad, _nPad));
            var sum = Vector256<double>.Zero;
            for (var v = 0; v < w.Length; v++)
            {
                sum += w[v] * column[v];
            }

            acc[t] = (sum.GetElement(0) + sum.GetElement(1)) + (sum.GetElement(2) + sum.GetElement(3));
        }
    }

    private BootstrapCounts FixedDesign(BootstrapScheme scheme, int resamples, ref Xoshiro256StarStar rng, Span<double> output, Span<int> recordIndices)
    {
        // b* - b_hat = M Q' e*, so figure k changes by sum_c FM[k, c] (Q' e*)_c.
        Span<double> acc = stackalloc double[Math.Max(_p, 4)];
        var threshold = Xoshiro256StarStar.RejectionThreshold(_n);
        var drawn = new int[_n];
        var errors = new double[_n];
        Span<double> roots = stackalloc double[_f - _fLinear];
        var counts = new BootstrapCounts(resamples, 0, 0, 0, 0);
        var good = 0;
        for (var r = 0; r < resamples; r++)
        {
            ResampleDraws.Errors(scheme, ref rng, _adjusted, _centred, threshold, drawn, errors);
            if (scheme == BootstrapScheme.Residual && !recordIndices.IsEmpty)
            {
                drawn.CopyTo(recordIndices.Slice(r * _n, _n));
            }

            ProjectErrors(errors, acc);
            var finite = true;
            for (var k = 0; k < _fLinear; k++)
            {
                var value = _estimates[k];
                for (var c = 0; c < _p; c++)
                {
                    value += _figureMap[(k * _p) + c] * acc[c];
                }

                finite &= double.IsFinite(value);
                output[(k * resamples) + good] = value;
            }

            var failure = finite ? ResampleFailure.None : ResampleFailure.NonFinite;
            if (failure == ResampleFailure.None && _inverse is not null)
            {
                failure = _inverse.Compute(acc[.._p], roots);
                for (var d = 0; d < roots.Length; d++)
                {
                    output[((_fLinear + d) * resamples) + good] = roots[d];
                }
            }

            if (failure == ResampleFailure.None)
            {
                good++;
            }
            else
            {
                counts = counts.With(failure);
            }
        }

        return counts with { Succeeded = good };
    }

    /// <summary>acc = Q' e (p values): for p &lt;= 4 one vector per point, even and odd points in two accumulators added at the end; a fixed order.</summary>
    private void ProjectErrors(double[] errors, Span<double> acc)
    {
        if (_p <= 4)
        {
            ref var rows = ref MemoryMarshal.GetArrayDataReference(_qRows);
            Vector256<double> a = default, b = default;
            var i = 0;
            for (; i + 1 < _n; i += 2)
            {
                a += Vector256.LoadUnsafe(ref rows, (nuint)(i * 4)) * Vector256.Create(errors[i]);
                b += Vector256.LoadUnsafe(ref rows, (nuint)((i + 1) * 4)) * Vector256.Create(errors[i + 1]);
            }

            if (i < _n)
            {
                a += Vector256.LoadUnsafe(ref rows, (nuint)(i * 4)) * Vector256.Create(errors[i]);
            }

            (a + b).StoreUnsafe(ref MemoryMarshal.GetReference(acc));
            return;
        }

        acc.Clear();
        for (var i = 0; i < _n; i++)
        {
            var row = _q.AsSpan(i * _p, _p);
            for (var c = 0; c < _p; c++)
            {
                acc[c] += row[c] * errors[i];
            }
        }
    }

    /// <summary>Solves (Q'WQ) a = Q'We by Cholesky (acc holds the packed upper triangle, then the right side) and maps a to the figures.</summary>
    private ResampleFailure Solve(ReadOnlySpan<double> acc, Span<double> work, Span<double> figures, Span<double> coords)
    {
        var p = _p;
        if (p == 2)
        {
            return Solve2(acc, figures, coords);
        }

        if (p == 3)
        {
            return Solve3(acc, figures, coords);
        }

        var l = work[..(p * p)];
        var a = work.Slice(p * p, p);
        var t = 0;
        for (var j = 0; j < p; j++)
        {
            for (var k = j; k < p; k++)
            {
                l[(k * p) + j] = acc[t++]; // lower triangle holds G
            }
        }

        for (var j = 0; j < p; j++)
        {
            var diagonal = l[(j * p) + j];
            var d = diagonal;
            for (var k = 0; k < j; k++)
            {
                d -= l[(j * p) + k] * l[(j * p) + k];
            }

            if (!(d > PivotTolerance * diagonal))
            {
                return ResampleFailure.RankDeficient;
            }

            var root = Math.Sqrt(d);
            l[(j * p) + j] = root;
            for (var i = j + 1; i < p; i++)
            {
                var s = l[(i * p) + j];
                for (var k = 0; k < j; k++)
                {
                    s -= l[(i * p) + k] * l[(j * p) + k];
                }

                l[(i * p) + j] = s / root;
            }
        }

        for (var i = 0; i < p; i++)
        {
            var s = acc[_triangle + i];
            for (var k = 0; k < i; k++)
            {
                s -= l[(i * p) + k] * a[k];
            }

            a[i] = s / l[(i * p) + i];
        }

        for (var i = p - 1; i >= 0; i--)
        {
            var s = a[i];
            for (var k = i + 1; k < p; k++)
            {
                s -= l[(k * p) + i] * a[k];
            }

            a[i] = s / l[(i * p) + i];
        }

        var finite = true;
        for (var k = 0; k < _fLinear; k++)
        {
            var value = _estimates[k];
            for (var c = 0; c < p; c++)
            {
                value += _figureMap[(k * p) + c] * a[c];
            }

            figures[k] = value;
            finite &= double.IsFinite(value);
        }

        a.CopyTo(coords);
        return finite ? ResampleFailure.None : ResampleFailure.NonFinite;
    }

    /// <summary>The 2 x 2 case of <see cref="Solve"/>, written out as an LDL' factorisation (the same pivots as Cholesky, no square roots).</summary>
    private ResampleFailure Solve2(ReadOnlySpan<double> acc, Span<double> figures, Span<double> coords)
    {
        double g00 = acc[0], g01 = acc[1], g11 = acc[2], c0 = acc[3], c1 = acc[4];
        if (!(g00 > PivotTolerance * g00))
        {
            return ResampleFailure.RankDeficient;
        }

        // LDL': the Cholesky pivots without square roots, one reciprocal and one division.
        var inverse0 = 1.0 / g00;
        var l10 = g01 * inverse0;
        var d1 = g11 - (l10 * g01);
        if (!(d1 > PivotTolerance * g11))
        {
            return ResampleFailure.RankDeficient;
        }

        var a1 = (c1 - (l10 * c0)) / d1;
        var a0 = (c0 - (g01 * a1)) * inverse0;
        var finite = true;
        for (var k = 0; k < _fLinear; k++)
        {
            var value = _estimates[k] + (_figureMap[k * 2] * a0) + (_figureMap[(k * 2) + 1] * a1);
            figures[k] = value;
            finite &= double.IsFinite(value);
        }

        coords[0] = a0;
        coords[1] = a1;
        return finite ? ResampleFailure.None : ResampleFailure.NonFinite;
    }

    /// <summary>
    /// The 3 x 3 case of <see cref="Solve"/>, written out as an LDL' factorisation: the same pivots
    /// d_j as Cholesky's squared diagonal, tested against the same tolerance, without square roots.
    /// </summary>
    private ResampleFailure Solve3(ReadOnlySpan<double> acc, Span<double> figures, Span<double> coords)
    {
        double g00 = acc[0], g01 = acc[1], g02 = acc[2], g11 = acc[3], g12 = acc[4], g22 = acc[5];
        double c0 = acc[6], c1 = acc[7], c2 = acc[8];
        if (!(g00 > PivotTolerance * g00))
        {
            return ResampleFailure.RankDeficient;
        }

        var inverse0 = 1.0 / g00;
        var l10 = g01 * inverse0;
        var l20 = g02 * inverse0;
        var d1 = g11 - (l10 * g01);
        if (!(d1 > PivotTolerance * g11))
        {
            return ResampleFailure.RankDeficient;
        }

        var e12 = g12 - (l20 * g01);
        var inverse1 = 1.0 / d1;
        var l21 = e12 * inverse1;
        var d2 = g22 - (l20 * g02) - (l21 * e12);
        if (!(d2 > PivotTolerance * g22))
        {
            return ResampleFailure.RankDeficient;
        }

        var y1 = c1 - (l10 * c0);
        var y2 = c2 - (l20 * c0) - (l21 * y1);
        var a2 = y2 / d2;
        var a1 = (y1 * inverse1) - (l21 * a2);
        var a0 = (c0 * inverse0) - (l10 * a1) - (l20 * a2);
        var finite = true;
        for (var k = 0; k < _fLinear; k++)
        {
            var value = _estimates[k] + (_figureMap[k * 3] * a0) + (_figureMap[(k * 3) + 1] * a1) + (_figureMap[(k * 3) + 2] * a2);
            figures[k] = value;
            finite &= double.IsFinite(value);
        }

        coords[0] = a0;
        coords[1] = a1;
        coords[2] = a2;
        return finite ? ResampleFailure.None : ResampleFailure.NonFinite;
    }

    /// <summary>A singular resample: no spread in the kept stimulus values is degenerate; otherwise too few distinct set points.</summary>
    private ResampleFailure Classify(ReadOnlySpan<double> weights)
    {
        double min = double.PositiveInfinity, max = double.NegativeInfinity;
        var any = false;
        for (var i = 0; i < _n; i++)
        {
            if (weights[i] > 0)
            {
                any = true;
                min = Math.Min(min, _stimulus[i]);
                max = Math.Max(max, _stimulus[i]);
            }
        }

        var noSpread = !any || (_intercept ? min == max : min == 0 && max == 0);
        return noSpread ? ResampleFailure.DegenerateStimulus : ResampleFailure.RankDeficient;
    }

    /// <summary>The thin Q (n x p, row-major) of the fitter's basis and the map M (p x p, row-major) from Q coordinates to natural parameters.</summary>
    private static (double[] Q, double[] M) Factorise(FitResult fit)
    {
        var n = fit.Count;
        var p = fit.ParameterCount;
        var model = fit.Model;
        var scaling = fit.Scaling;
        var basis = new double[n * p];
        var row = new double[p];
        for (var i = 0; i < n; i++)
        {
            fit.FillDesignRow(i, row);
            for (var j = 0; j < p; j++)
            {
                basis[(j * n) + i] = row[j];
            }
        }

        var columnScale = new double[p];
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
            foreach (ref var v in column)
            {
                v /= norm;
            }
        }

        var qr = new HouseholderQr(basis, n, p);
        var thin = qr.ThinQ();
        var q = new double[n * p];
        for (var i = 0; i < n; i++)
        {
            for (var k = 0; k < p; k++)
            {
                q[(i * p) + k] = thin[(k * n) + i];
            }
        }

        var natural = new double[p * p];
        model.FillNaturalMap(scaling, natural);
        var m = new double[p * p];
        var x = new double[p];
        var scaled = new double[p];
        for (var c = 0; c < p; c++)
        {
            Array.Clear(x);
            x[c] = 1.0;
            qr.SolveUpper(x);
            for (var k = 0; k < p; k++)
            {
                var j = qr.Permutation(k);
                scaled[j] = x[k] / columnScale[j];
            }

            for (var i = 0; i < p; i++)
            {
                var sum = 0.0;
                for (var j = 0; j < p; j++)
                {
                    sum += natural[(i * p) + j] * scaled[j];
                }

                m[(i * p) + c] = sum;
            }
        }

        return (q, m);
    }
}
