using StandFit.Core.Diagnostics;
using StandFit.Core.Evaluation;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Uncertainty;

namespace StandFit.Edges.Outputs;

/// <summary>Builds the summary row of one judged unit.</summary>
public static class SummaryRecordFactory
{
    public static SummaryRecord Create(UnitEvaluation unit, string sourceSha256, DateTime processedAtUtc, string toolVersion, IEnumerable<MetadataEntry>? metadata = null)
    {
        if (processedAtUtc.Kind != DateTimeKind.Utc)
        {
            throw new ArgumentException("Processing time must be UTC.", nameof(processedAtUtc));
        }

        var recipe = unit.Recipe;
        var fit = unit.Fit;
        var record = new SummaryRecord
        {
            UnitKey = UnitKeys.Of(sourceSha256, recipe?.ContentHash),
            Serial = unit.Identity?.Serial,
            Part = unit.Identity?.Part,
            Station = unit.Identity?.Station,
            TestStart = unit.Identity?.TestStartUtc,
            SourceFile = unit.SourceName,
            SourceSha256 = sourceSha256,
            RecipeName = recipe?.Name,
            RecipeVersion = recipe?.Version,
            RecipeHash = recipe?.ContentHash,
            Model = fit?.ModelName ?? recipe?.Model.Name,
            Confidence = recipe?.Confidence.Value,
            Points = unit.Sweep?.Count,
            DegreesOfFreedom = fit?.DegreesOfFreedom,
            Weighted = fit?.IsWeighted,
            ResidualSd = fit?.ResidualSd,
            RSquared = Finite(fit?.RSquared),
            AdjustedRSquared = Finite(fit?.AdjustedRSquared),
            FitStatus = unit.Search?.StatusCode,
            FitIterations = unit.Search?.Iterations,
            FitStopReason = unit.Search?.StatusReason,
            ConditionNumber = fit?.ConditionNumber,
            RunsCount = unit.Runs?.Runs,
            RunsZ = unit.Runs is { IsApplicable: true } r ? r.Z : null,
            RunsP = unit.Runs?.IsApplicable == true ? unit.Runs.P : null,
            RunsMidP = unit.Runs?.IsApplicable == true ? unit.Runs.MidP : null,
            RunsMethod = unit.Runs?.Method.ToString().ToLowerInvariant(),
            RunsOrder = recipe?.RunsGate is { } runsGate ? ResidualOrderNames.Name(runsGate.Order) : null,
            DurbinWatsonOrder = recipe?.DiagnosticGates.FirstOrDefault(g => g.Kind == DiagnosticGateKind.DurbinWatson) is { } dwGate ? ResidualOrderNames.Name(dwGate.Order) : null,
            Ruling = RulingText(unit.Ruling),
            ReasonCodes = [.. unit.Verdict.Reasons.Select(f => f.Code)],
            Reasons = [.. unit.Verdict.Reasons.Select(f => f.Sentence)],
            ProcessedAt = processedAtUtc,
            ToolVersion = toolVersion,
            Metadata = [.. (metadata ?? unit.Sweep?.Metadata ?? []).Select(m => new MetadataRecord { Key = m.Key, Value = m.Value })],
        };

        foreach (var p in unit.Parameters)
        {
            record.Parameters.Add(new ParameterRecord
            {
                Name = p.Name,
                Unit = recipe?.UnitOf(p.Name),
                Estimate = p.Estimate,
                StandardError = p.StandardError,
                CiLow = p.Low,
                CiHigh = p.High,
                T = p.T,
                P = p.P,
            });
        }

        foreach (var limit in unit.Verdict.Reasons.Select(f => f.Limit).OfType<LimitResult>())
        {
            record.LimitResults.Add(new LimitResultRecord
            {
                Figure = limit.Figure,
                Value = limit.Value,
                ExpandedUncertainty = limit.ExpandedUncertainty,
                Low = limit.Low,
                High = limit.High,
                Min = limit.Min,
                Max = limit.Max,
                Rule = limit.Rule == DecisionRule.Guarded ? "guarded" : "simple",
                Zone = limit.Zone.ToString().ToLowerInvariant(),
                Conditional = limit.Conditional,
                Interval = IntervalSources.Name(limit.Interval),
            });
        }

        foreach (var d in unit.Derived)
        {
            record.Derived.Add(new DerivedRecord
            {
                Name = d.Name,
                Unit = recipe?.UnitOf(d.Name),
                Estimate = d.Estimate,
                StandardError = d.StandardError,
            });
        }

        if (fit is not null)
        {
            record.Covariance = [.. fit.Covariance];
            record.Correlation = [.. fit.Correlation];
        }

        foreach (var c in unit.Curve)
        {
            record.Curve.Add(new CurveRecord
            {
                Name = c.Name,
                Kind = c.Kind switch
                {
                    DerivedKind.SensitivityAt => "sensitivity_at",
                    DerivedKind.ValueAt => "value_at",
                    DerivedKind.BandAt => "band_at",
                    _ => "inverse_at",
                },
                At = c.At,
                Status = c.StatusCode,
                Unit = recipe is null ? null : c.Kind switch
                {
                    DerivedKind.SensitivityAt => recipe.UnitOfSensitivity(),
                    DerivedKind.InverseAt => recipe.Units.Stimulus,
                    _ => recipe.Units.Output,
                },
                Value = c.IsOk ? c.Value : null,
                StandardError = c.IsOk ? c.StandardError : null,
                CiLow = c.IsOk ? c.Low : null,
                CiHigh = c.IsOk ? c.High : null,
                PredictionLow = c.IsOk ? c.PredictionLow : null,
                PredictionHigh = c.IsOk ? c.PredictionHigh : null,
                Slope = c.IsOk ? c.Slope : null,
                IntervalLow = c.IsOk ? c.IntervalLow : null,
                IntervalHigh = c.IsOk ? c.IntervalHigh : null,
            });
        }

        ResamplingRecords.Fill(record, unit.Resampling);

        if (unit.Diagnostics is { } diagnostics)
        {
            AddDiagnostics(record, diagnostics, unit.Sweep);
        }

        if (unit.Parameter("offset") is { } offset)
        {
            (record.OffsetEstimate, record.OffsetSe, record.OffsetCiLow, record.OffsetCiHigh, record.OffsetT, record.OffsetP) = Flat(offset);
        }

        if (unit.Parameter("gain") is { } gain)
        {
            (record.GainEstimate, record.GainSe, record.GainCiLow, record.GainCiHigh, record.GainT, record.GainP) = Flat(gain);
        }

        return record;
    }

    private static void AddDiagnostics(SummaryRecord record, ResidualDiagnostics d, Sweep? sweep)
    {
        static double? V(double value) => double.IsNaN(value) ? null : value;
        if (d.RunsByAcquisition.IsApplicable)
        {
            (record.RunsAcquisitionCount, record.RunsAcquisitionZ, record.RunsAcquisitionP, record.RunsAcquisitionMidP) = (d.RunsByAcquisition.Runs, d.RunsByAcquisition.Z, d.RunsByAcquisition.P, d.RunsByAcquisition.MidP);
        }

        if (d.RunsPerLeg.Of(Leg.Up) is { IsApplicable: true } up)
        {
            (record.RunsUpCount, record.RunsUpP) = (up.Runs, up.P);
        }

        if (d.RunsPerLeg.Of(Leg.Down) is { IsApplicable: true } down)
        {
            (record.RunsDownCount, record.RunsDownP) = (down.Runs, down.P);
        }

        if (d.RunsPerLeg.IsApplicable)
        {
            record.RunsPerLegP = d.RunsPerLeg.P;
            var within = d.RunsPerLeg.WithinLegs;
            (record.RunsWithinLegsCount, record.RunsWithinLegsZ, record.RunsWithinLegsP, record.RunsWithinLegsMidP) = (within.Runs, within.Z, within.P, within.MidP);
        }

        if (d.DurbinWatson.IsApplicable)
        {
            (record.DurbinWatson, record.DurbinWatsonP) = (d.DurbinWatson.Statistic, d.DurbinWatson.P);
        }

        if (d.DurbinWatsonByStimulus is { IsApplicable: true } byStimulus)
        {
            (record.DurbinWatsonStimulus, record.DurbinWatsonStimulusP) = (byStimulus.Statistic, byStimulus.P);
        }

        if (d.DurbinWatsonPerLeg is { IsApplicable: true } perLeg)
        {
            (record.DurbinWatsonPerLeg, record.DurbinWatsonPerLegP) = (perLeg.Statistic, perLeg.P);
        }

        if (d.Autocorrelation.IsApplicable)
        {
            (record.Lag1Autocorrelation, record.LjungBoxQ, record.LjungBoxP) = (d.Autocorrelation.Lag1, d.Autocorrelation.LjungBoxQ, d.Autocorrelation.P);
        }

        record.SetPoints = d.SetPoints.Count;
        if (d.LackOfFit.IsApplicable)
        {
            (record.LackOfFitF, record.LackOfFitDf1, record.LackOfFitDf2, record.LackOfFitP) = (d.LackOfFit.F, d.LackOfFit.LackDf, d.LackOfFit.PureErrorDf, d.LackOfFit.P);
        }

        if (d.Curvature.IsApplicable)
        {
            (record.CurvatureF, record.CurvatureDf, record.CurvatureP) = (d.Curvature.F, d.Curvature.Df, d.Curvature.P);
        }

        if (d.BreuschPagan.IsApplicable)
        {
            (record.BreuschPagan, record.BreuschPaganDf, record.BreuschPaganP) = (d.BreuschPagan.Statistic, d.BreuschPagan.Df, d.BreuschPagan.P);
            (record.BreuschPaganF, record.BreuschPaganFP) = (Finite(d.BreuschPagan.F), d.BreuschPagan.FP);
        }

        if (d.ShapiroWilk.IsApplicable)
        {
            (record.ShapiroWilkW, record.ShapiroWilkP) = (d.ShapiroWilk.W, d.ShapiroWilk.P);
        }

        if (d.AndersonDarling.IsApplicable)
        {
            (record.AndersonDarlingA2, record.AndersonDarlingAStar, record.AndersonDarlingP) = (d.AndersonDarling.A2, d.AndersonDarling.AStar, d.AndersonDarling.P);
        }

        (record.Skewness, record.ExcessKurtosis) = (V(d.Moments.Skewness), V(d.Moments.ExcessKurtosis));
        if (d.Outliers.IsApplicable)
        {
            record.MaxAbsRstudent = d.Outliers.MaxAbsStudentized;
            record.OutlierPoint = d.Outliers.Index + 1;
            record.OutlierLine = sweep is not null && d.Outliers.Index < sweep.SourceLines.Length ? sweep.SourceLines[d.Outliers.Index] : null;
            record.OutlierP = d.Outliers.P;
        }

        record.MaxLeverage = V(PointDiagnostics.MaxFinite(d.Points.Leverage));
        record.MaxCooksDistance = V(PointDiagnostics.MaxFinite(d.Points.CooksDistance));
        record.HistogramEdges = [.. d.Histogram.Edges];
        record.HistogramCounts = [.. d.Histogram.Counts];
        if (d.Merit is { } m)
        {
            record.FullScaleOutput = m.FullScaleOutput;
            record.NonlinearityTerminalPct = m.NonlinearityTerminalPct;
            record.NonlinearityLeastSquaresPct = m.NonlinearityLeastSquaresPct;
            record.NonlinearityMinimaxPct = m.NonlinearityMinimaxPct;
            record.HysteresisPct = m.HysteresisPct;
            record.NonrepeatabilityPct = m.NonrepeatabilityPct;
            record.ZeroErrorPct = m.ZeroErrorPct;
            record.SpanErrorPct = m.SpanErrorPct;
            record.MaxErrorPct = m.MaxErrorPct;
            record.LowerLimitFactor = m.LowerLimitFactor;
        }
    }

    private static double? Finite(double? value) => value is { } v && double.IsFinite(v) ? v : null;

    public static string RulingText(Ruling ruling) => ruling switch
    {
        Ruling.Pass => "pass",
        Ruling.Fail => "fail",
        Ruling.Retest => "retest",
        _ => "rejected",
    };

    private static (double?, double?, double?, double?, double?, double?) Flat(ParameterEstimate p) =>
        (p.Estimate, p.StandardError, p.Low, p.High, p.T, p.P);
}

/// <summary>The key that identifies one unit's result: the sweep's content hash and the recipe's hash.</summary>
public static class UnitKeys
{
    /// <summary><c>sha256-of-sweep:sha256-of-recipe</c> (the recipe part is <c>none</c> when no recipe matched).</summary>
    public static string Of(string sweepSha256, string? recipeHash) => $"{sweepSha256}:{recipeHash ?? "none"}";
}
