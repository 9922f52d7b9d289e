using StandFit.Core.Fitting;

namespace StandFit.Core.Diagnostics;

/// <summary>
/// The Breusch-Pagan test for non-constant variance in Koenker's studentised form
/// (lmtest::bptest with studentize = TRUE): regress w_i = e_i^2 - RSS/n on the constant and the
/// model's terms; BP = n * (explained sum of squares of w) / (sum of w^2), chi-square with as many
/// degrees of freedom as non-constant terms. Robust to non-normal errors, unlike the original form.
/// </summary>
public sealed record BreuschPaganResult(double Statistic, int Df, double P, string Method)
{
    public bool IsApplicable => Method != DiagnosticMethods.NotApplicable;

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

        var bp = n * basis.ProjectedSquaredNorm(w) / ww;
        return new BreuschPaganResult(bp, df, Probability.ChiSquareUpper(bp, df), DiagnosticMethods.ChiSquare);
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
