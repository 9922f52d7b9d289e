using System.Collections.Immutable;
using System.Globalization;
using System.Text;

namespace StandFit.Core.Reporting;

/// <summary>
/// A linear map from data values (the domain) to drawing coordinates (the range). The range may run
/// backwards (an SVG y axis grows downwards). A domain of one value is widened around it so that
/// the value lands in the middle of the range.
/// </summary>
public sealed record SvgScale(double DomainMin, double DomainMax, double RangeMin, double RangeMax)
{
    public static SvgScale Of(double min, double max, double rangeMin, double rangeMax)
    {
        if (!double.IsFinite(min) || !double.IsFinite(max))
        {
            (min, max) = (0, 1);
        }

        if (max < min)
        {
            (min, max) = (max, min);
        }

        if (max == min)
        {
            var half = min == 0 ? 1 : Math.Abs(min) * 0.01;
            (min, max) = (min - half, max + half);
        }

        return new SvgScale(min, max, rangeMin, rangeMax);
    }

    /// <summary>The scale of <paramref name="values"/> widened by <paramref name="pad"/> of their span on each side.</summary>
    public static SvgScale Fitting(IEnumerable<double> values, double rangeMin, double rangeMax, double pad = 0.05)
    {
        var min = double.PositiveInfinity;
        var max = double.NegativeInfinity;
        foreach (var v in values)
        {
            if (double.IsFinite(v))
            {
                min = Math.Min(min, v);
                max = Math.Max(max, v);
            }
        }

        if (min > max)
        {
            return Of(0, 1, rangeMin, rangeMax);
        }

        var span = max - min;
        return Of(min - (pad * span), max + (pad * span), rangeMin, rangeMax);
    }

    public double Map(double value) => RangeMin + ((value - DomainMin) / (DomainMax - DomainMin) * (RangeMax - RangeMin));

    /// <summary>Round tick values inside the domain, about <paramref name="target"/> of them.</summary>
    public SvgTicks Ticks(int target = 5) => SvgTicks.Of(DomainMin, DomainMax, target);
}

/// <summary>
/// Axis ticks at round values: a step of 1, 2 or 5 times a power of ten, chosen as the smallest
/// such step that puts at most about <c>target</c> ticks in the interval ("nice numbers",
/// Heckbert, Graphics Gems, 1990). Labels carry just enough decimals for the step.
/// </summary>
public sealed record SvgTicks(ImmutableArray<double> Values, double Step)
{
    public static SvgTicks Of(double min, double max, int target = 5)
    {
        if (!(max > min) || !double.IsFinite(min) || !double.IsFinite(max) || target < 1)
        {
            return new SvgTicks([], 0);
        }

        var rough = (max - min) / target;
        var power = Math.Pow(10, Math.Floor(Math.Log10(rough)));
        var fraction = rough / power;
        var step = (fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10) * power;
        var first = Math.Ceiling((min / step) - 1e-9);
        var last = Math.Floor((max / step) + 1e-9);
        var values = ImmutableArray.CreateBuilder<double>();
        for (var k = first; k <= last; k++)
        {
            var v = k * step;
            values.Add(Math.Abs(v) < step * 1e-9 ? 0 : v);
        }

        return new SvgTicks(values.ToImmutable(), step);
    }

    /// <summary>A tick's label: fixed-point with the decimals the step needs, or scientific notation for very small or very large values.</summary>
    public string Label(double value)
    {
        if (Step <= 0 || !double.IsFinite(value))
        {
            return value.ToString("G4", CultureInfo.InvariantCulture);
        }

        var largest = Values.IsDefaultOrEmpty ? Math.Abs(value) : Values.Max(Math.Abs);
        if (Step < 1e-5 || largest >= 1e7)
        {
            return value.ToString("0.###E+0", CultureInfo.InvariantCulture);
        }

        var decimals = Math.Max(0, (int)-Math.Floor(Math.Log10(Step) + 1e-9));
        return value.ToString("F" + decimals.ToString(CultureInfo.InvariantCulture), CultureInfo.InvariantCulture);
    }
}

/// <summary>
/// SVG path data, written compactly: coordinates to one decimal (a tenth of a pixel), trailing
/// zeros dropped, the implicit line-to of SVG after the first point of a polyline, and markers
/// as tiny closed squares in one path, so that thousands of points stay small.
/// </summary>
public static class SvgPath
{
    /// <summary>A coordinate to one decimal, invariant culture, no trailing zeros, never "-0".</summary>
    public static string Number(double value)
    {
        var rounded = Math.Round(value, 1, MidpointRounding.AwayFromZero);
        if (rounded == 0 || !double.IsFinite(rounded))
        {
            return "0";
        }

        return rounded.ToString("0.#", CultureInfo.InvariantCulture);
    }

    /// <summary>"M x0 y0 x1 y1 …": one polyline through the points (non-finite points break the line).</summary>
    public static string Polyline(IEnumerable<(double X, double Y)> points)
    {
        var text = new StringBuilder();
        var open = false;
        foreach (var (x, y) in points)
        {
            if (!double.IsFinite(x) || !double.IsFinite(y))
            {
                open = false;
                continue;
            }

            text.Append(open ? " " : "M").Append(Number(x)).Append(' ').Append(Number(y));
            open = true;
        }

        return text.ToString();
    }

    /// <summary>A closed polygon: the upper edge left to right, then the lower edge back (a band).</summary>
    public static string Band(IReadOnlyList<(double X, double Low, double High)> points)
    {
        var upper = points.Where(p => double.IsFinite(p.X) && double.IsFinite(p.High) && double.IsFinite(p.Low)).ToList();
        if (upper.Count < 2)
        {
            return "";
        }

        var line = Polyline(upper.Select(p => (p.X, p.High)).Concat(Enumerable.Reverse(upper).Select(p => (p.X, p.Low))));
        return line + "Z";
    }

    /// <summary>A square marker of side <paramref name="size"/> centred on each point, all in one path.</summary>
    public static string Squares(IEnumerable<(double X, double Y)> points, double size)
    {
        var text = new StringBuilder();
        var side = Number(size);
        var half = size / 2;
        foreach (var (x, y) in points)
        {
            if (!double.IsFinite(x) || !double.IsFinite(y))
            {
                continue;
            }

            text.Append('M').Append(Number(x - half)).Append(' ').Append(Number(y - half))
                .Append('h').Append(side).Append('v').Append(side).Append("h-").Append(side).Append('z');
        }

        return text.ToString();
    }

    /// <summary>Axis-aligned rectangles (bars), all in one path: x, y the top-left corner.</summary>
    public static string Rectangles(IEnumerable<(double X, double Y, double Width, double Height)> bars)
    {
        var text = new StringBuilder();
        foreach (var (x, y, w, h) in bars)
        {
            if (!(w > 0) || !(h > 0) || !double.IsFinite(x) || !double.IsFinite(y))
            {
                continue;
            }

            text.Append('M').Append(Number(x)).Append(' ').Append(Number(y))
                .Append('h').Append(Number(w)).Append('v').Append(Number(h)).Append('h').Append(Number(-w)).Append('z');
        }

        return text.ToString();
    }
}
