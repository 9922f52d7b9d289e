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
            Model = fit?.Model.Name ?? recipe?.Model.Name,
            Confidence = recipe?.Confidence.Value,
            Points = unit.Sweep?.Count,
            DegreesOfFreedom = fit?.DegreesOfFreedom,
            Weighted = fit?.IsWeighted,
            ResidualSd = fit?.ResidualSd,
            RSquared = fit?.RSquared,
            AdjustedRSquared = fit?.AdjustedRSquared,
            ConditionNumber = fit?.ConditionNumber,
            RunsCount = unit.Runs?.Runs,
            RunsZ = unit.Runs is { IsApplicable: true } r ? r.Z : null,
            RunsP = unit.Runs?.IsApplicable == true ? unit.Runs.P : null,
            RunsMethod = unit.Runs?.Method.ToString().ToLowerInvariant(),
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

        ResamplingRecords.Fill(record, unit.Resampling);

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
