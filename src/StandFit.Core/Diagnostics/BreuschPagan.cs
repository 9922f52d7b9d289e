using StandFit.Core.Fitting;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The Breusch-Pagan test for non-constant variance in Koenker's studentised form
/// (lmtest::bptest with studentize = TRUE): regress w_i = e_i^2 - RSS/n on the constant and the
/// model's terms; BP = n * (explained sum of squares of w) / (sum of w^2), chi-square with as many
/// degrees of freedom as non-constant terms. Robust to non-normal errors, unlike the original form.
/// <para>
/// <see cref="Statistic"/> and <see cref="P"/> are lmtest's. The chi-square reference is
/// asymptotic and is conservative in its upper tail at sweep sizes (on 21-point sweeps 0.43 % of
/// well-behaved units below 0.01, docs/diagnostics.md), so the heteroscedasticity gate judges
/// <see cref="FP"/>: the F form of the same auxiliary regression, F = (R^2 / k) / ((1 - R^2) /
/// (n - k - 1)) with R^2 = BP / n, on k and n - k - 1 degrees of freedom, the F test of the
/// regression of e^2 on the terms (Wooldridge, Introductory Econometrics, section 8.3, gives the
/// F and the n R^2 forms side by side). F is increasing in BP, so the two rank units alike.
/// </para>
/// </summary>
public sealed record BreuschPaganResult(double Statistic, int Df, double P, string Method)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

    /// <summary>The F form of the statistic (infinite when the auxiliary regression fits e^2 exactly).</summary>
    public double F { get; init; } = double.NaN;

    /// <summary>The denominator degrees of freedom of <see cref="F"/>: n - k - 1.</summary>
    public int FDf2 { get; init; }

    /// <summary>The upper tail of F(k, n - k - 1) at <see cref="F"/>: the p-value the heteroscedasticity gate judges.</summary>
    public double FP { get; init; } = double.NaN;

    public static BreuschPaganResult NotApplicable { get; } = new(double.NaN, 0, double.NaN, DiagnosticMethods.NotApplicable);
}

public static class BreuschPagan
{
    public static BreuschPaganResult Compute(IFitResult fit) => Compute(fit, DesignBasis.Of(fit));

    internal static BreuschPaganResult Compute(IFitResult fit, DesignBasis design)
    {
        var n = fit.Count;
        var basis = design.HasConstant ? design : WithConstant(fit);
        var df = basis.Columns - 1;
        if (df < 1 || n <= basis.Columns)
        {
            return BreuschPaganResult.NotApplicable;
        }

        var sigma2 = fit.ResidualSumOfSquares / n;
        Span<double> w = n <= 512 ? stackalloc double[n] : new double[n];
        var ww = 0.0;
        for (var i = 0; i < n; i++)
        {
            w[i] = (fit.WeightedResiduals[i] * fit.WeightedResiduals[i]) - sigma2;
            ww += w[i] * w[i];
        }

        if (!(ww > 0))
        {
            return BreuschPaganResult.NotApplicable;
        }

        var explained = basis.ProjectedSquaredNorm(w);
        var bp = n * explained / ww;
        var df2 = n - df - 1;
        var unexplained = ww - explained;
        var f = unexplained > 0 ? explained / df / (unexplained / df2) : double.PositiveInfinity;
        return new BreuschPaganResult(bp, df, Probability.ChiSquareUpper(bp, df), DiagnosticMethods.ChiSquare)
        {
            F = f,
            FDf2 = df2,
            FP = Probability.FUpper(f, df, df2),
        };
    }

    /// <summary>The constant and the model's basis, for a model without a constant term.</summary>
    private static DesignBasis WithConstant(IFitResult fit)
    {
        var n = fit.Count;
        var p = fit.ParameterCount;
        var columns = new double[n * (p + 1)];
        var row = new double[p];
        for (var i = 0; i < n; i++)
        {
            columns[i] = 1.0;
            fit.FillDesignRow(i, row);
            for (var j = 0; j < p; j++)
            {
                columns[((j + 1) * n) + i] = row[j];
            }
        }

        return DesignBasis.FromColumns(columns, n, p + 1, hasConstant: true);
    }
}
