using StandFit.Core.Curve;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;

namespace StandFit.Edges.Outputs;

/// <summary>Builds the per-point rows of one judged unit: one row per sweep point of a fitted unit, none otherwise.</summary>
public static class PointRecordFactory
{
    private static readonly List<double> NoFurtherInputs = [];

    public static List<PointRecord> Create(UnitEvaluation unit, string unitKey)
    {
        if (unit.Fit is not { } fit || unit.Sweep is not { } sweep || unit.Recipe is not { } recipe)
        {
            return [];
        }

        var studentized = unit.Diagnostics?.Points.Studentized;
        var cooks = unit.Diagnostics?.Points.CooksDistance;
        var rows = new List<PointRecord>(fit.Count);
        var x = new double[fit.InputCount];

        // The readings' own standard uncertainties (output units), for a weighted linear fit.
        var uncertainties = fit is FitResult { IsWeighted: true } weighted ? weighted.Uncertainties : default;
        for (var i = 0; i < fit.Count; i++)
        {
            for (var k = 0; k < x.Length; k++)
            {
                x[k] = fit.Inputs[k][i];
            }

            double? u = uncertainties.IsDefault ? null : uncertainties[i];
            var band = CurveUse.BandAt(fit, x, recipe.Confidence, u);
            rows.Add(new PointRecord
            {
                UnitKey = unitKey,
                Point = i + 1,
                SourceLine = sweep.SourceLines[i],
                Leg = sweep.Legs[i] switch { Leg.Up => "up", Leg.Down => "down", _ => null },
                Stimulus = x[0],
                FurtherInputs = x.Length == 1 ? NoFurtherInputs : [.. x[1..]],
                Output = sweep.Output[i],
                Response = fit.Output[i],
                Uncertainty = u,
                Fitted = fit.Fitted[i],
                Residual = fit.Residuals[i],
                BandLow = band.ConfidenceLow,
                BandHigh = band.ConfidenceHigh,
                Leverage = fit.Leverage[i],
                StudentizedResidual = Finite(studentized, i),
                CooksDistance = Finite(cooks, i),
            });
        }

        return rows;
    }

    private static double? Finite(System.Collections.Immutable.ImmutableArray<double>? values, int i) =>
        values is { } v && i < v.Length && double.IsFinite(v[i]) ? v[i] : null;
}
