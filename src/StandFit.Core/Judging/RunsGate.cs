using StandFit.Core.Diagnostics;
using StandFit.Core.Problems;

namespace StandFit.Core.Judging;

/// <summary>
/// The residual-structure gate: the runs test on the signs of the residuals in stimulus order fails
/// the unit when its two-sided p-value is below <see cref="PValueFloor"/> (0 &lt; floor &lt; 0.5).
/// </summary>
public sealed record RunsGate
{
    public RunsGate(double pValueFloor)
    {
        if (!(pValueFloor is > 0 and < 0.5))
        {
            throw new ArgumentOutOfRangeException(nameof(pValueFloor), pValueFloor, "A p-value floor lies between 0 and 0.5.");
        }

        PValueFloor = pValueFloor;
    }

    public double PValueFloor { get; }

    public Finding Judge(RunsTestResult runs)
    {
        if (!runs.IsApplicable)
        {
            return new Finding(ReasonCodes.RunsNotApplicable.Code, ReasonCodes.RunsNotApplicable.Kind, Messages.RunsNotApplicable(runs.Positive, runs.Negative));
        }

        var structure = runs.P < PValueFloor;
        var code = structure ? ReasonCodes.RunsStructure : ReasonCodes.RunsOk;
        var method = runs.Method == RunsMethod.Exact ? "exact" : "normal approximation";
        return new Finding(code.Code, code.Kind, Messages.RunsFinding(runs.Runs, runs.Positive, runs.Negative, runs.Expected, runs.Z, runs.P, method, PValueFloor, structure));
    }
}
