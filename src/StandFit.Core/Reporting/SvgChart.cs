using System.Text;

namespace StandFit.Core.Reporting;

/// <summary>
/// One chart as inline SVG: a plot area inside margins, x and y scales onto it, axes with round
/// ticks, grid lines, axis titles, and the marks the caller adds. Plain SVG only (paths, lines,
/// rectangles, circles, text): no scripts, images, links or external references.
/// </summary>
internal sealed class SvgChart
{
    public const double Left = 70;
    public const double Right = 16;
    public const double Top = 38;
    public const double Bottom = 42;

    private readonly StringBuilder _marks = new();

    public SvgChart(double width, double height, SvgScale x, SvgScale y, string title, string xTitle, string yTitle, string cssClass = "chart", double bottom = Bottom)
    {
        BottomMargin = bottom;
        Width = width;
        Height = height;
        Title = title;
        XTitle = xTitle;
        YTitle = yTitle;
        CssClass = cssClass;
        X = x with { RangeMin = Left, RangeMax = width - Right };
        Y = y with { RangeMin = height - bottom, RangeMax = Top };
    }

    public double Width { get; }

    /// <summary>The space below the plot for tick labels and the axis title.</summary>
    public double BottomMargin { get; }

    public double Height { get; }

    public string Title { get; }

    public string XTitle { get; }

    public string YTitle { get; }

    public string CssClass { get; }

    public SvgScale X { get; }

    public SvgScale Y { get; }

    /// <summary>Labels for the x ticks instead of their values (for an axis of categories), or null.</summary>
    public Func<double, string?>? XLabel { get; init; }

    public int XTickTarget { get; init; } = 6;

    public int YTickTarget { get; init; } = 5;

    public double PlotLeft { get; } = Left;

    public double PlotRight => Width - Right;

    public double PlotTop { get; } = Top;

    public double PlotBottom => Height - BottomMargin;

    /// <summary>Adds raw SVG markup (already escaped) to the marks.</summary>
    public SvgChart Raw(string markup)
    {
        _marks.Append(markup);
        return this;
    }

    public SvgChart Path(string data, string cssClass, string? title = null)
    {
        if (data.Length == 0)
        {
            return this;
        }

        _marks.Append("<path class=\"").Append(cssClass).Append("\" d=\"").Append(data).Append('"');
        if (title is null)
        {
            _marks.Append("/>");
        }
        else
        {
            _marks.Append("><title>").Append(Html.Escape(title)).Append("</title></path>");
        }

        return this;
    }

    /// <summary>A horizontal line across the plot at data value <paramref name="y"/>, with a label at its right end.</summary>
    public SvgChart HorizontalLine(double y, string cssClass, string? label = null)
    {
        var py = SvgPath.Number(Y.Map(y));
        _marks.Append("<path class=\"").Append(cssClass).Append("\" d=\"M").Append(SvgPath.Number(PlotLeft)).Append(' ').Append(py)
            .Append('H').Append(SvgPath.Number(PlotRight)).Append("\"/>");
        if (label is not null)
        {
            Text(PlotRight - 4, Y.Map(y) - 3, label, "label end");
        }

        return this;
    }

    public SvgChart Circle(double x, double y, double r, string cssClass, string? title = null)
    {
        _marks.Append("<circle class=\"").Append(cssClass).Append("\" cx=\"").Append(SvgPath.Number(X.Map(x))).Append("\" cy=\"").Append(SvgPath.Number(Y.Map(y)))
            .Append("\" r=\"").Append(SvgPath.Number(r)).Append('"');
        if (title is null)
        {
            _marks.Append("/>");
        }
        else
        {
            _marks.Append("><title>").Append(Html.Escape(title)).Append("</title></circle>");
        }

        return this;
    }

    /// <summary>Text at drawing coordinates (not data values), escaped.</summary>
    public SvgChart Text(double px, double py, string text, string cssClass, double rotate = 0)
    {
        _marks.Append("<text class=\"").Append(cssClass).Append("\" x=\"").Append(SvgPath.Number(px)).Append("\" y=\"").Append(SvgPath.Number(py)).Append('"');
        if (rotate != 0)
        {
            _marks.Append(" transform=\"rotate(").Append(SvgPath.Number(rotate)).Append(' ').Append(SvgPath.Number(px)).Append(' ').Append(SvgPath.Number(py)).Append(")\"");
        }

        _marks.Append('>').Append(Html.Escape(text)).Append("</text>");
        return this;
    }

    public string ToSvg(string? ariaLabel = null)
    {
        var svg = new StringBuilder(_marks.Length + 2048);
        svg.Append("<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"").Append(CssClass).Append("\" viewBox=\"0 0 ")
            .Append(SvgPath.Number(Width)).Append(' ').Append(SvgPath.Number(Height)).Append("\" style=\"max-width:").Append(SvgPath.Number(Width)).Append("px\" role=\"img\" aria-label=\"")
            .Append(Html.Escape(ariaLabel ?? Title)).Append("\">");
        svg.Append("<text class=\"title\" x=\"").Append(SvgPath.Number(PlotLeft)).Append("\" y=\"16\">").Append(Html.Escape(Title)).Append("</text>");

        var grid = new StringBuilder();
        var xTicks = X.Ticks(XTickTarget);
        foreach (var t in xTicks.Values)
        {
            var px = SvgPath.Number(X.Map(t));
            grid.Append('M').Append(px).Append(' ').Append(SvgPath.Number(PlotTop)).Append('V').Append(SvgPath.Number(PlotBottom));
            var label = XLabel is null ? xTicks.Label(t) : XLabel(t);
            if (label is not null)
            {
                svg.Append("<text class=\"tick mid\" x=\"").Append(px).Append("\" y=\"").Append(SvgPath.Number(PlotBottom + 14)).Append("\">").Append(Html.Escape(label)).Append("</text>");
            }
        }

        var yTicks = Y.Ticks(YTickTarget);
        foreach (var t in yTicks.Values)
        {
            var py = SvgPath.Number(Y.Map(t));
            grid.Append('M').Append(SvgPath.Number(PlotLeft)).Append(' ').Append(py).Append('H').Append(SvgPath.Number(PlotRight));
            svg.Append("<text class=\"tick end\" x=\"").Append(SvgPath.Number(PlotLeft - 4)).Append("\" y=\"").Append(SvgPath.Number(Y.Map(t) + 3.5)).Append("\">").Append(Html.Escape(yTicks.Label(t))).Append("</text>");
        }

        if (grid.Length > 0)
        {
            svg.Append("<path class=\"grid\" d=\"").Append(grid).Append("\"/>");
        }

        svg.Append("<rect class=\"frame\" x=\"").Append(SvgPath.Number(PlotLeft)).Append("\" y=\"").Append(SvgPath.Number(PlotTop))
            .Append("\" width=\"").Append(SvgPath.Number(PlotRight - PlotLeft)).Append("\" height=\"").Append(SvgPath.Number(PlotBottom - PlotTop)).Append("\"/>");
        svg.Append(_marks);
        svg.Append("<text class=\"axis mid\" x=\"").Append(SvgPath.Number((PlotLeft + PlotRight) / 2)).Append("\" y=\"").Append(SvgPath.Number(Height - 8)).Append("\">").Append(Html.Escape(XTitle)).Append("</text>");
        var yMid = (PlotTop + PlotBottom) / 2;
        svg.Append("<text class=\"axis mid\" x=\"14\" y=\"").Append(SvgPath.Number(yMid)).Append("\" transform=\"rotate(-90 14 ").Append(SvgPath.Number(yMid)).Append(")\">").Append(Html.Escape(YTitle)).Append("</text>");
        svg.Append("</svg>");
        return svg.ToString();
    }

    /// <summary>A data point in drawing coordinates.</summary>
    public (double X, double Y) At(double x, double y) => (X.Map(x), Y.Map(y));
}
