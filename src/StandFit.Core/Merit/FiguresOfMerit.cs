using System.Collections.Immutable;
using System.Runtime.CompilerServices;
using StandFit.Core.Diagnostics;
using StandFit.Core.Ingest;

namespace StandFit.Core.Merit;

/// <summary>The nominal (ideal) transfer curve of a part: output = Offset + Gain * stimulus.</summary>
public sealed record NominalLine(double Offset, double Gain)
{
    public double At(double stimulus) => Offset + (Gain * stimulus);
}

/// <summary>
/// One set point of the calibration curve: the mean stimulus and the mean output, each the mean of
/// the approach directions present (up, down, and readings without a leg), each direction averaged
/// over its readings. <see cref="Up"/> and <see cref="Down"/> are the directions' mean outputs.
/// </summary>
public sealed record CalibrationPoint(double Stimulus, double Output, double? Up, double? Down, int Readings);

/// <summary>
/// The instrument trade's figures of merit of one sweep (ISA-51.1 / ISA-37.1 terms; see
/// docs/figures-of-merit.md), in % of the full-scale output FSO = (mean output at the highest set
/// point) - (mean output at the lowest set point), the terminal readings of the calibration curve;
/// percentages are of |FSO|. Null where the sweep cannot give the figure (no set point with both
/// legs, no repeated same-direction readings, no nominal curve).
/// </summary>
public sealed record FiguresOfMerit(
    double FullScaleOutput,
    double NonlinearityTerminalPct,
    double NonlinearityLeastSquaresPct,
    double NonlinearityMinimaxPct,
    double? HysteresisPct,
    double? NonrepeatabilityPct,
    double? ZeroErrorPct,
    double? SpanErrorPct,
    double? MaxErrorPct,
    double LowerLimitFactor,
    Line Terminal,
    Line LeastSquares,
    Line Minimax,
    ImmutableArray<CalibrationPoint> Curve)
{
    /// <summary>ASTM E74's empirical factor: LLF = 2.4 s (trade-reference.md: confirmed only through a calibration laboratory's note).</summary>
    public const double LowerLimitMultiplier = 2.4;

    /// <summary>
    /// The figures of a sweep whose points are grouped into set points; <paramref name="residualSd"/>
    /// is the fit's residual SD (for the LLF). Null with fewer than two set points or a zero FSO.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static FiguresOfMerit? Compute(ReadOnlySpan<double> stimulus, ReadOnlySpan<double> output, ReadOnlySpan<Leg> legs, SetPointGrouping groups, double residualSd, NominalLine? nominal)
    {
        var c = groups.Count;
        if (c < 2)
        {
            return null;
        }

        // Per set point and direction (up, down, no leg): sums, counts, and the spread of the readings.
        // Scratch per set point and direction on the stack (a few hundred set points at most in practice).
        var cells = c * 3;
        var small = cells <= 768;
        Span<double> sumX = small ? stackalloc double[cells] : new double[cells];
        Span<double> sumY = small ? stackalloc double[cells] : new double[cells];
        Span<int> count = small ? stackalloc int[cells] : new int[cells];
        Span<double> min = small ? stackalloc double[cells] : new double[cells];
        Span<double> max = small ? stackalloc double[cells] : new double[cells];
        sumX.Clear();
        sumY.Clear();
        count.Clear();
        min.Fill(double.PositiveInfinity);
        max.Fill(double.NegativeInfinity);
        for (var i = 0; i < stimulus.Length; i++)
        {
            var d = legs[i] switch { Leg.Up => 0, Leg.Down => 1, _ => 2 };
            var k = (groups.GroupOf[i] * 3) + d;
            sumX[k] += stimulus[i];
            sumY[k] += output[i];
            count[k]++;
            min[k] = Math.Min(min[k], output[i]);
            max[k] = Math.Max(max[k], output[i]);
        }

        var x = new double[c];
        var y = new double[c];
        var curve = ImmutableArray.CreateBuilder<CalibrationPoint>(c);
        double? hysteresis = null, spread = null;
        for (var g = 0; g < c; g++)
        {
            double mx = 0, my = 0;
            var present = 0;
            var readings = 0;
            for (var d = 0; d < 3; d++)
            {
                var k = (g * 3) + d;
                if (count[k] == 0)
                {
                    continue;
                }

                present++;
                readings += count[k];
                mx += sumX[k] / count[k];
                my += sumY[k] / count[k];
                if (count[k] >= 2)
                {
                    spread = Math.Max(spread ?? 0, max[k] - min[k]);
                }
            }

            x[g] = mx / present;
            y[g] = my / present;
            double? up = count[g * 3] > 0 ? sumY[g * 3] / count[g * 3] : null;
            double? down = count[(g * 3) + 1] > 0 ? sumY[(g * 3) + 1] / count[(g * 3) + 1] : null;
            if (up is { } u && down is { } dn)
            {
                hysteresis = Math.Max(hysteresis ?? 0, Math.Abs(u - dn));
            }

            curve.Add(new CalibrationPoint(x[g], y[g], up, down, readings));
        }

        var fso = y[c - 1] - y[0];
        if (!(Math.Abs(fso) > 0))
        {
            return null;
        }

        var percent = 100.0 / Math.Abs(fso);
        var terminal = StraightLines.Terminal(x, y);
        var leastSquares = StraightLines.LeastSquares(x, y);
        var minimax = StraightLines.Minimax(x, y);
        double? zero = null, span = null, largest = null;
        if (nominal is not null)
        {
            zero = (y[0] - nominal.At(x[0])) * percent;
            span = (fso - (nominal.Gain * (x[c - 1] - x[0]))) * percent;
            var worst = 0.0;
            for (var i = 0; i < stimulus.Length; i++)
            {
                worst = Math.Max(worst, Math.Abs(output[i] - nominal.At(stimulus[i])));
            }

            largest = worst * percent;
        }

        return new FiguresOfMerit(
            fso,
            terminal.MaxDeviation(x, y) * percent,
            leastSquares.MaxDeviation(x, y) * percent,
            minimax.MaxDeviation(x, y) * percent,
            hysteresis * percent,
            spread * percent,
            zero,
            span,
            largest,
            LowerLimitMultiplier * residualSd,
            terminal,
            leastSquares,
            minimax,
            curve.MoveToImmutable());
    }
}
