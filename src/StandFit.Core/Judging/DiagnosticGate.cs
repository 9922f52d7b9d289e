using StandFit.Core.Diagnostics;
using StandFit.Core.Problems;

namespace StandFit.Core.Judging;

/// <summary>Which residual diagnostic a gate judges.</summary>
public enum DiagnosticGateKind
{
    /// <summary>Durbin-Watson on the residuals in acquisition order, exact one-sided p (positive autocorrelation).</summary>
    DurbinWatson,

    /// <summary>Lack of fit against pure error from replicated set points.</summary>
    LackOfFit,

    /// <summary>The partial F of the next polynomial power.</summary>
    Curvature,

    /// <summary>Normality of the residuals, by <see cref="NormalityTest"/>.</summary>
    Normality,

    /// <summary>Breusch-Pagan (Koenker's studentized form), judged by its F form's p (<see cref="BreuschPaganResult.FP"/>).</summary>
    Heteroscedasticity,

    /// <summary>Bonferroni test of the largest studentized residual.</summary>
    Outliers,
}

/// <summary>The normality test a normality gate uses.</summary>
public enum NormalityTest
{
    ShapiroWilk,
    AndersonDarling,
}

/// <summary>
/// A residual-structure gate on one diagnostic: the unit fails when the diagnostic's p-value is
/// below <see cref="PValueFloor"/> (0 &lt; floor &lt; 0.5), with the gate's own reason code; a p-value
/// at or above the floor is a passing finding; a diagnostic that cannot be computed for the fit is a
/// passing "not applicable" finding (the gate does not judge), as for the runs gate.
/// </summary>
public sealed record DiagnosticGate
{
    public DiagnosticGate(DiagnosticGateKind kind, double pValueFloor, NormalityTest normality = NormalityTest.ShapiroWilk, ResidualOrder order = ResidualOrder.Acquisition)
    {
        if (kind != DiagnosticGateKind.DurbinWatson && order != ResidualOrder.Acquisition)
        {
            throw new ArgumentException("Only the Durbin-Watson gate takes an order.", nameof(order));
        }

        if (!(pValueFloor is > 0 and < 0.5))
        {
            throw new ArgumentOutOfRangeException(nameof(pValueFloor), pValueFloor, "A p-value floor lies between 0 and 0.5.");
        }

        Kind = kind;
        PValueFloor = pValueFloor;
        Normality = normality;
        Order = order;
    }

    /// <summary>For a Durbin-Watson gate, the order its residuals are taken in (acquisition by default).</summary>
    public ResidualOrder Order { get; }

    public DiagnosticGateKind Kind { get; }

    public double PValueFloor { get; }

    /// <summary>For a normality gate, the test it uses.</summary>
    public NormalityTest Normality { get; }

    /// <summary>The p-value this gate judges, or null when the diagnostic does not apply to the fit.</summary>
    public double? PValue(ResidualDiagnostics d) => Kind switch
    {
        DiagnosticGateKind.DurbinWatson => d.DurbinWatsonIn(Order) is { IsApplicable: true } dw ? dw.P : null,
        DiagnosticGateKind.LackOfFit => d.LackOfFit.IsApplicable ? d.LackOfFit.P : null,
        DiagnosticGateKind.Curvature => d.Curvature.IsApplicable ? d.Curvature.P : null,
        DiagnosticGateKind.Normality when Normality == NormalityTest.ShapiroWilk => d.ShapiroWilk.IsApplicable ? d.ShapiroWilk.P : null,
        DiagnosticGateKind.Normality => d.AndersonDarling.IsApplicable ? d.AndersonDarling.P : null,
        DiagnosticGateKind.Heteroscedasticity => d.BreuschPagan.IsApplicable ? d.BreuschPagan.FP : null,
        _ => d.Outliers.IsApplicable ? d.Outliers.P : null,
    };

    /// <summary>The finding for one unit; <paramref name="sourceLines"/> (the sweep's file lines, per point) name an outlier's line.</summary>
    public Finding Judge(ResidualDiagnostics d, IReadOnlyList<int>? sourceLines = null)
    {
        var (ok, fail, notApplicable, test) = Codes();
        if (PValue(d) is not { } p)
        {
            return new Finding(notApplicable.Code, notApplicable.Kind, Messages.DiagnosticNotApplicable(test));
        }

        var below = p < PValueFloor;
        var code = below ? fail : ok;
        var sentence = Kind switch
        {
            DiagnosticGateKind.DurbinWatson => Messages.DurbinWatsonFinding(d.DurbinWatsonIn(Order).Statistic, p, PValueFloor, below, OrderPhrase),
            DiagnosticGateKind.LackOfFit => Messages.LackOfFitFinding(d.LackOfFit.F, d.LackOfFit.LackDf, d.LackOfFit.PureErrorDf, d.SetPoints.Count, p, PValueFloor, below),
            DiagnosticGateKind.Curvature => Messages.CurvatureFinding(d.Curvature.NextPower, d.Curvature.F, d.Curvature.Df, p, PValueFloor, below),
            DiagnosticGateKind.Normality when Normality == NormalityTest.ShapiroWilk => Messages.NormalityFinding("Shapiro-Wilk", "W", d.ShapiroWilk.W, p, PValueFloor, below),
            DiagnosticGateKind.Normality => Messages.NormalityFinding("Anderson-Darling", "A*", d.AndersonDarling.AStar, p, PValueFloor, below),
            DiagnosticGateKind.Heteroscedasticity => Messages.HeteroscedasticityFinding(d.BreuschPagan.Statistic, d.BreuschPagan.Df, d.BreuschPagan.F, d.BreuschPagan.FDf2, p, PValueFloor, below),
            _ => Messages.OutlierFinding(
                d.Outliers.MaxAbsStudentized,
                d.Outliers.Index + 1,
                sourceLines is not null && d.Outliers.Index < sourceLines.Count ? sourceLines[d.Outliers.Index] : 0,
                d.Outliers.Df,
                p,
                PValueFloor,
                below),
        };
        return new Finding(code.Code, code.Kind, sentence);
    }

    private string OrderPhrase => Order switch
    {
        ResidualOrder.Stimulus => "in stimulus order",
        ResidualOrder.PerLeg => "within legs (per-leg order)",
        _ => "in acquisition order",
    };

    private (ReasonCode Ok, ReasonCode Fail, ReasonCode NotApplicable, string Test) Codes() => Kind switch
    {
        DiagnosticGateKind.DurbinWatson => (ReasonCodes.DurbinWatsonOk, ReasonCodes.Autocorrelated, ReasonCodes.DurbinWatsonNotApplicable, "Durbin-Watson test"),
        DiagnosticGateKind.LackOfFit => (ReasonCodes.LackOfFitOk, ReasonCodes.LackOfFit, ReasonCodes.LackOfFitNotApplicable, "lack-of-fit test"),
        DiagnosticGateKind.Curvature => (ReasonCodes.CurvatureOk, ReasonCodes.Curvature, ReasonCodes.CurvatureNotApplicable, "curvature test"),
        DiagnosticGateKind.Normality => (ReasonCodes.NormalityOk, ReasonCodes.NotNormal, ReasonCodes.NormalityNotApplicable, Normality == NormalityTest.ShapiroWilk ? "Shapiro-Wilk test" : "Anderson-Darling test"),
        DiagnosticGateKind.Heteroscedasticity => (ReasonCodes.VarianceOk, ReasonCodes.Heteroscedastic, ReasonCodes.HeteroscedasticityNotApplicable, "Breusch-Pagan test"),
        _ => (ReasonCodes.OutliersOk, ReasonCodes.Outlier, ReasonCodes.OutliersNotApplicable, "outlier test"),
    };
}
