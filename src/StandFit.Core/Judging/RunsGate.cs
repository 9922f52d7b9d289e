using System.Globalization;
using StandFit.Core.Diagnostics;
using StandFit.Core.Ingest;
using StandFit.Core.Problems;

namespace StandFit.Core.Judging;

/// <summary>
/// The residual-structure gate on the runs test: the signs of the residuals in <see cref="Order"/>
/// (stimulus by default; acquisition; or per leg, each leg in acquisition order, the legs' run
/// counts summed in the stratified test, <see cref="PerLegRunsResult.WithinLegs"/>) fail the unit
/// when the two-sided mid-p value (<see cref="RunsTestResult.MidP"/>; the exact test's own p is
/// discrete and fails about half the units its level says, docs/diagnostics.md) is below
/// <see cref="PValueFloor"/> (0 &lt; floor &lt; 0.5). A p-value at the floor passes; a test that
/// cannot be made passes with <c>residuals.runs_not_applicable</c>.
/// </summary>
public sealed record RunsGate
{
    public RunsGate(double pValueFloor, ResidualOrder order = ResidualOrder.Stimulus)
    {
        if (!(pValueFloor is > 0 and < 0.5))
        {
            throw new ArgumentOutOfRangeException(nameof(pValueFloor), pValueFloor, "A p-value floor lies between 0 and 0.5.");
        }

        PValueFloor = pValueFloor;
        Order = order;
    }

    public double PValueFloor { get; }

    /// <summary>The order the residual signs are taken in.</summary>
    public ResidualOrder Order { get; }

    /// <summary>
    /// The finding for one unit: <paramref name="byStimulus"/> is the unit's runs test in stimulus
    /// order; <paramref name="diagnostics"/> gives the acquisition and per-leg tests (needed for those orders).
    /// </summary>
    public Finding Judge(RunsTestResult byStimulus, ResidualDiagnostics? diagnostics = null)
    {
        switch (Order)
        {
            case ResidualOrder.Stimulus:
                return JudgeOne(byStimulus, "stimulus order");
            case ResidualOrder.Acquisition:
                return JudgeOne(Require(diagnostics).RunsByAcquisition, "acquisition order");
            default:
                return JudgePerLeg(Require(diagnostics).RunsPerLeg);
        }
    }

    /// <summary>The finding for one runs test taken in stimulus order (the gate's default order).</summary>
    public Finding Judge(RunsTestResult runs) => Judge(runs, null);

    private static ResidualDiagnostics Require(ResidualDiagnostics? diagnostics) =>
        diagnostics ?? throw new InvalidOperationException("A runs gate in acquisition or per-leg order needs the unit's residual diagnostics.");

    private Finding JudgeOne(RunsTestResult runs, string order)
    {
        if (!runs.IsApplicable)
        {
            return new Finding(ReasonCodes.RunsNotApplicable.Code, ReasonCodes.RunsNotApplicable.Kind, Messages.RunsNotApplicable(runs.Positive, runs.Negative));
        }

        var structure = runs.MidP < PValueFloor;
        var code = structure ? ReasonCodes.RunsStructure : ReasonCodes.RunsOk;
        return new Finding(code.Code, code.Kind, Messages.RunsFinding(runs.Runs, runs.Positive, runs.Negative, runs.Expected, runs.Z, runs.P, runs.MidP, MethodName(runs), PValueFloor, structure, order));
    }

    private Finding JudgePerLeg(PerLegRunsResult legs)
    {
        if (!legs.IsApplicable)
        {
            return new Finding(ReasonCodes.RunsNotApplicable.Code, ReasonCodes.RunsNotApplicable.Kind, Messages.RunsPerLegNotApplicable());
        }

        var parts = new List<string>(legs.Legs.Length);
        for (var i = 0; i < legs.Legs.Length; i++)
        {
            var name = legs.Legs[i] == Leg.Unknown ? "unlabelled" : legs.Legs[i].ToString().ToLower(CultureInfo.InvariantCulture);
            var r = legs.Results[i];
            parts.Add(r.IsApplicable ? Messages.RunsLeg(name, r.Runs, r.Positive, r.Negative, r.P) : Messages.RunsLegNotApplicable(name, r.Positive, r.Negative));
        }

        var within = legs.WithinLegs;
        var structure = within.MidP < PValueFloor;
        var code = structure ? ReasonCodes.RunsStructure : ReasonCodes.RunsOk;
        return new Finding(code.Code, code.Kind, Messages.RunsPerLegFinding(string.Join("; ", parts), legs.Applicable, within.Runs, within.Expected, within.Z, within.P, within.MidP, MethodName(within), PValueFloor, structure));
    }

    private static string MethodName(RunsTestResult runs) => runs.Method == RunsMethod.Exact ? "exact" : "normal approximation";
}
