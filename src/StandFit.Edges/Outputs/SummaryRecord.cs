using System.Text.Json.Serialization;
using Parquet.Serialization.Attributes;

namespace StandFit.Edges.Outputs;

/// <summary>One <c># key: value</c> line of the sweep file, as a struct inside the summary row's <c>metadata</c> list.</summary>
public sealed class MetadataRecord
{
    [JsonPropertyName("key")]
    [ParquetRequired]
    public string Key { get; set; } = "";

    [JsonPropertyName("value")]
    [ParquetRequired]
    public string Value { get; set; } = "";
}

/// <summary>What one limit decided, as a struct inside the summary row's <c>limit_results</c> list.</summary>
public sealed class LimitResultRecord
{
    [JsonPropertyName("figure")]
    [ParquetRequired]
    public string Figure { get; set; } = "";

    [JsonPropertyName("value")]
    public double Value { get; set; }

    /// <summary>The expanded uncertainty U of the guard band (0 under simple acceptance).</summary>
    [JsonPropertyName("expanded_uncertainty")]
    public double ExpandedUncertainty { get; set; }

    [JsonPropertyName("low")]
    public double Low { get; set; }

    [JsonPropertyName("high")]
    public double High { get; set; }

    [JsonPropertyName("min")]
    public double? Min { get; set; }

    [JsonPropertyName("max")]
    public double? Max { get; set; }

    /// <summary>simple or guarded.</summary>
    [JsonPropertyName("rule")]
    [ParquetRequired]
    public string Rule { get; set; } = "";

    /// <summary>within, above, below or straddles.</summary>
    [JsonPropertyName("zone")]
    [ParquetRequired]
    public string Zone { get; set; } = "";

    /// <summary>For a straddling interval: pass when the estimate itself is inside the limits, fail otherwise; null elsewhere.</summary>
    [JsonPropertyName("conditional")]
    public string? Conditional { get; set; }

    /// <summary>The interval judged: t, jackknife, bootstrap-percentile, bootstrap-basic or bootstrap-bca.</summary>
    [JsonPropertyName("interval")]
    [ParquetRequired]
    public string Interval { get; set; } = "t";
}

/// <summary>One parameter of a unit's fit, as a struct inside the summary row's <c>parameters</c> list.</summary>
public sealed class ParameterRecord
{
    [JsonPropertyName("name")]
    [ParquetRequired]
    public string Name { get; set; } = "";

    [JsonPropertyName("unit")]
    public string? Unit { get; set; }

    [JsonPropertyName("estimate")]
    public double Estimate { get; set; }

    [JsonPropertyName("se")]
    public double StandardError { get; set; }

    [JsonPropertyName("ci_low")]
    public double CiLow { get; set; }

    [JsonPropertyName("ci_high")]
    public double CiHigh { get; set; }

    [JsonPropertyName("t")]
    public double T { get; set; }

    [JsonPropertyName("p")]
    public double P { get; set; }
}

/// <summary>One quantity derived from the fit (a trade coefficient), as a struct inside the summary row's <c>derived</c> list.</summary>
public sealed class DerivedRecord
{
    [JsonPropertyName("name")]
    [ParquetRequired]
    public string Name { get; set; } = "";

    [JsonPropertyName("unit")]
    public string? Unit { get; set; }

    [JsonPropertyName("estimate")]
    public double Estimate { get; set; }

    [JsonPropertyName("se")]
    public double StandardError { get; set; }
}

/// <summary>One derived figure of the fitted curve (the recipe's <c>derived</c>), as a struct inside the summary row's <c>curve</c> list.</summary>
public sealed class CurveRecord
{
    [JsonPropertyName("name")]
    [ParquetRequired]
    public string Name { get; set; } = "";

    /// <summary>sensitivity_at, value_at, band_at or inverse_at.</summary>
    [JsonPropertyName("kind")]
    [ParquetRequired]
    public string Kind { get; set; } = "";

    /// <summary>The stimulus point (the output value for inverse_at).</summary>
    [JsonPropertyName("at")]
    public double At { get; set; }

    /// <summary>ok, outside-range, not-monotonic or non-finite.</summary>
    [JsonPropertyName("status")]
    [ParquetRequired]
    public string Status { get; set; } = "";

    [JsonPropertyName("unit")]
    public string? Unit { get; set; }

    [JsonPropertyName("value")]
    public double? Value { get; set; }

    [JsonPropertyName("se")]
    public double? StandardError { get; set; }

    [JsonPropertyName("ci_low")]
    public double? CiLow { get; set; }

    [JsonPropertyName("ci_high")]
    public double? CiHigh { get; set; }

    [JsonPropertyName("prediction_low")]
    public double? PredictionLow { get; set; }

    [JsonPropertyName("prediction_high")]
    public double? PredictionHigh { get; set; }

    [JsonPropertyName("slope")]
    public double? Slope { get; set; }

    [JsonPropertyName("interval_low")]
    public double? IntervalLow { get; set; }

    [JsonPropertyName("interval_high")]
    public double? IntervalHigh { get; set; }
}

/// <summary>
/// One row of the summary table (output/summaries/date=YYYY-MM-DD/*.parquet): one unit, its
/// identity, the recipe that judged it, the fit and the ruling. docs/outputs.md documents every
/// column; an approval test pins the schema. Timestamps are UTC, INT64 milliseconds.
/// </summary>
public sealed class SummaryRecord
{
    /// <summary>Bumped whenever a column is added, removed or changes meaning.</summary>
    public const int CurrentSchemaVersion = 9;

    [JsonPropertyName("schema_version")]
    public int SchemaVersion { get; set; } = CurrentSchemaVersion;

    /// <summary>Content SHA-256 of the sweep file and the recipe's hash: the unit's row key.</summary>
    [JsonPropertyName("unit_key")]
    [ParquetRequired]
    public string UnitKey { get; set; } = "";

    /// <summary>The <c>unit_key</c> of the latest earlier row of the same part and serial (a retest or a re-judgement), or null.</summary>
    [JsonPropertyName("retest_of")]
    public string? RetestOf { get; set; }

    [JsonPropertyName("serial")]
    public string? Serial { get; set; }

    [JsonPropertyName("part")]
    public string? Part { get; set; }

    [JsonPropertyName("station")]
    public string? Station { get; set; }

    [JsonPropertyName("test_start")]
    [ParquetTimestamp(ParquetTimestampResolution.Milliseconds, useLogicalTimestamp: true, isAdjustedToUTC: true)]
    public DateTime? TestStart { get; set; }

    /// <summary>Every metadata line of the sweep file (normalised keys), including those the tool does not read itself.</summary>
    [JsonPropertyName("metadata")]
    public List<MetadataRecord> Metadata { get; set; } = [];

    [JsonPropertyName("source_file")]
    [ParquetRequired]
    public string SourceFile { get; set; } = "";

    [JsonPropertyName("source_sha256")]
    [ParquetRequired]
    public string SourceSha256 { get; set; } = "";

    [JsonPropertyName("recipe_name")]
    public string? RecipeName { get; set; }

    [JsonPropertyName("recipe_version")]
    public string? RecipeVersion { get; set; }

    [JsonPropertyName("recipe_hash")]
    public string? RecipeHash { get; set; }

    [JsonPropertyName("model")]
    public string? Model { get; set; }

    [JsonPropertyName("confidence")]
    public double? Confidence { get; set; }

    [JsonPropertyName("n_points")]
    public int? Points { get; set; }

    [JsonPropertyName("df")]
    public int? DegreesOfFreedom { get; set; }

    /// <summary>True when the fit was weighted by the readings' standard uncertainties.</summary>
    [JsonPropertyName("weighted")]
    public bool? Weighted { get; set; }

    /// <summary>How the Levenberg-Marquardt search of an expression model ended (converged-rss ... max-iterations); null for linear models.</summary>
    [JsonPropertyName("fit_status")]
    public string? FitStatus { get; set; }

    [JsonPropertyName("fit_iterations")]
    public int? FitIterations { get; set; }

    [JsonPropertyName("fit_stop_reason")]
    public string? FitStopReason { get; set; }

    [JsonPropertyName("parameters")]
    public List<ParameterRecord> Parameters { get; set; } = [];

    /// <summary>The model's derived quantities (the trade's own coefficients), with delta-method standard errors.</summary>
    [JsonPropertyName("derived")]
    public List<DerivedRecord> Derived { get; set; } = [];

    /// <summary>Covariance of the estimates, p x p row-major in <c>parameters</c> order.</summary>
    [JsonPropertyName("covariance")]
    public List<double> Covariance { get; set; } = [];

    /// <summary>Correlation of the estimates, p x p row-major in <c>parameters</c> order.</summary>
    [JsonPropertyName("correlation")]
    public List<double> Correlation { get; set; } = [];

    /// <summary>The recipe's derived figures of the curve: sensitivities, values, bands, inverse predictions.</summary>
    [JsonPropertyName("curve")]
    public List<CurveRecord> Curve { get; set; } = [];

    [JsonPropertyName("offset_estimate")]
    public double? OffsetEstimate { get; set; }

    [JsonPropertyName("offset_se")]
    public double? OffsetSe { get; set; }

    [JsonPropertyName("offset_ci_low")]
    public double? OffsetCiLow { get; set; }

    [JsonPropertyName("offset_ci_high")]
    public double? OffsetCiHigh { get; set; }

    [JsonPropertyName("offset_t")]
    public double? OffsetT { get; set; }

    [JsonPropertyName("offset_p")]
    public double? OffsetP { get; set; }

    [JsonPropertyName("gain_estimate")]
    public double? GainEstimate { get; set; }

    [JsonPropertyName("gain_se")]
    public double? GainSe { get; set; }

    [JsonPropertyName("gain_ci_low")]
    public double? GainCiLow { get; set; }

    [JsonPropertyName("gain_ci_high")]
    public double? GainCiHigh { get; set; }

    [JsonPropertyName("gain_t")]
    public double? GainT { get; set; }

    [JsonPropertyName("gain_p")]
    public double? GainP { get; set; }

    [JsonPropertyName("residual_sd")]
    public double? ResidualSd { get; set; }

    [JsonPropertyName("r_squared")]
    public double? RSquared { get; set; }

    [JsonPropertyName("adj_r_squared")]
    public double? AdjustedRSquared { get; set; }

    [JsonPropertyName("condition_number")]
    public double? ConditionNumber { get; set; }

    [JsonPropertyName("runs_count")]
    public int? RunsCount { get; set; }

    [JsonPropertyName("runs_z")]
    public double? RunsZ { get; set; }

    [JsonPropertyName("runs_p")]
    public double? RunsP { get; set; }

    /// <summary>The two-sided mid-p of the stimulus-order runs test: what a stimulus-order runs gate judges (schema 9).</summary>
    [JsonPropertyName("runs_mid_p")]
    public double? RunsMidP { get; set; }

    [JsonPropertyName("runs_method")]
    public string? RunsMethod { get; set; }

    // Residual diagnostics and figures of merit (schema 3; docs/outputs.md, docs/diagnostics.md).
    [JsonPropertyName("runs_acquisition_count")]
    public int? RunsAcquisitionCount { get; set; }

    [JsonPropertyName("runs_acquisition_z")]
    public double? RunsAcquisitionZ { get; set; }

    [JsonPropertyName("runs_acquisition_p")]
    public double? RunsAcquisitionP { get; set; }

    [JsonPropertyName("runs_acquisition_mid_p")]
    public double? RunsAcquisitionMidP { get; set; }

    // Residual orders of the gates and the per-leg runs test (schema 8).

    /// <summary>The order the recipe's runs gate takes (stimulus, acquisition or per-leg); null without a runs gate.</summary>
    [JsonPropertyName("runs_order")]
    public string? RunsOrder { get; set; }

    [JsonPropertyName("runs_up_count")]
    public int? RunsUpCount { get; set; }

    [JsonPropertyName("runs_up_p")]
    public double? RunsUpP { get; set; }

    [JsonPropertyName("runs_down_count")]
    public int? RunsDownCount { get; set; }

    [JsonPropertyName("runs_down_p")]
    public double? RunsDownP { get; set; }

    /// <summary>The legs combined: Šidák's adjustment of the smallest leg p-value.</summary>
    [JsonPropertyName("runs_per_leg_p")]
    public double? RunsPerLegP { get; set; }

    // The stratified runs test within legs, what a per-leg runs gate judges (schema 9).
    [JsonPropertyName("runs_within_legs_count")]
    public int? RunsWithinLegsCount { get; set; }

    [JsonPropertyName("runs_within_legs_z")]
    public double? RunsWithinLegsZ { get; set; }

    [JsonPropertyName("runs_within_legs_p")]
    public double? RunsWithinLegsP { get; set; }

    [JsonPropertyName("runs_within_legs_mid_p")]
    public double? RunsWithinLegsMidP { get; set; }

    [JsonPropertyName("dw")]
    public double? DurbinWatson { get; set; }

    [JsonPropertyName("dw_p")]
    public double? DurbinWatsonP { get; set; }

    /// <summary>The order the recipe's Durbin-Watson gate takes; null without that gate (schema 8).</summary>
    [JsonPropertyName("dw_order")]
    public string? DurbinWatsonOrder { get; set; }

    [JsonPropertyName("dw_stimulus")]
    public double? DurbinWatsonStimulus { get; set; }

    [JsonPropertyName("dw_stimulus_p")]
    public double? DurbinWatsonStimulusP { get; set; }

    [JsonPropertyName("dw_per_leg")]
    public double? DurbinWatsonPerLeg { get; set; }

    [JsonPropertyName("dw_per_leg_p")]
    public double? DurbinWatsonPerLegP { get; set; }

    [JsonPropertyName("lag1_autocorrelation")]
    public double? Lag1Autocorrelation { get; set; }

    [JsonPropertyName("ljung_box_q")]
    public double? LjungBoxQ { get; set; }

    [JsonPropertyName("ljung_box_p")]
    public double? LjungBoxP { get; set; }

    [JsonPropertyName("set_points")]
    public int? SetPoints { get; set; }

    [JsonPropertyName("lof_f")]
    public double? LackOfFitF { get; set; }

    [JsonPropertyName("lof_df1")]
    public int? LackOfFitDf1 { get; set; }

    [JsonPropertyName("lof_df2")]
    public int? LackOfFitDf2 { get; set; }

    [JsonPropertyName("lof_p")]
    public double? LackOfFitP { get; set; }

    [JsonPropertyName("curvature_f")]
    public double? CurvatureF { get; set; }

    [JsonPropertyName("curvature_df")]
    public int? CurvatureDf { get; set; }

    [JsonPropertyName("curvature_p")]
    public double? CurvatureP { get; set; }

    [JsonPropertyName("bp")]
    public double? BreuschPagan { get; set; }

    [JsonPropertyName("bp_df")]
    public int? BreuschPaganDf { get; set; }

    [JsonPropertyName("bp_p")]
    public double? BreuschPaganP { get; set; }

    /// <summary>The F form of the Breusch-Pagan statistic and its p, what the heteroscedasticity gate judges (schema 9).</summary>
    [JsonPropertyName("bp_f")]
    public double? BreuschPaganF { get; set; }

    [JsonPropertyName("bp_f_p")]
    public double? BreuschPaganFP { get; set; }

    [JsonPropertyName("sw_w")]
    public double? ShapiroWilkW { get; set; }

    [JsonPropertyName("sw_p")]
    public double? ShapiroWilkP { get; set; }

    [JsonPropertyName("ad_a2")]
    public double? AndersonDarlingA2 { get; set; }

    [JsonPropertyName("ad_astar")]
    public double? AndersonDarlingAStar { get; set; }

    [JsonPropertyName("ad_p")]
    public double? AndersonDarlingP { get; set; }

    [JsonPropertyName("skewness")]
    public double? Skewness { get; set; }

    [JsonPropertyName("excess_kurtosis")]
    public double? ExcessKurtosis { get; set; }

    [JsonPropertyName("max_abs_rstudent")]
    public double? MaxAbsRstudent { get; set; }

    [JsonPropertyName("outlier_point")]
    public int? OutlierPoint { get; set; }

    [JsonPropertyName("outlier_line")]
    public int? OutlierLine { get; set; }

    [JsonPropertyName("outlier_p")]
    public double? OutlierP { get; set; }

    [JsonPropertyName("max_leverage")]
    public double? MaxLeverage { get; set; }

    [JsonPropertyName("max_cooks_distance")]
    public double? MaxCooksDistance { get; set; }

    [JsonPropertyName("histogram_edges")]
    public List<double> HistogramEdges { get; set; } = [];

    [JsonPropertyName("histogram_counts")]
    public List<int> HistogramCounts { get; set; } = [];

    [JsonPropertyName("fso")]
    public double? FullScaleOutput { get; set; }

    [JsonPropertyName("nonlinearity_terminal_pct")]
    public double? NonlinearityTerminalPct { get; set; }

    [JsonPropertyName("nonlinearity_ls_pct")]
    public double? NonlinearityLeastSquaresPct { get; set; }

    [JsonPropertyName("nonlinearity_minimax_pct")]
    public double? NonlinearityMinimaxPct { get; set; }

    [JsonPropertyName("hysteresis_pct")]
    public double? HysteresisPct { get; set; }

    [JsonPropertyName("nonrepeatability_pct")]
    public double? NonrepeatabilityPct { get; set; }

    [JsonPropertyName("zero_error_pct")]
    public double? ZeroErrorPct { get; set; }

    [JsonPropertyName("span_error_pct")]
    public double? SpanErrorPct { get; set; }

    [JsonPropertyName("max_error_pct")]
    public double? MaxErrorPct { get; set; }

    [JsonPropertyName("llf")]
    public double? LowerLimitFactor { get; set; }

    /// <summary>pass, fail, retest or rejected.</summary>
    [JsonPropertyName("ruling")]
    [ParquetRequired]
    public string Ruling { get; set; } = "";

    [JsonPropertyName("reason_codes")]
    public List<string> ReasonCodes { get; set; } = [];

    [JsonPropertyName("reasons")]
    public List<string> Reasons { get; set; } = [];

    /// <summary>Every limit's decision, in the order of the reasons (most severe first): the audit trail of the ruling.</summary>
    [JsonPropertyName("limit_results")]
    public List<LimitResultRecord> LimitResults { get; set; } = [];

    /// <summary>The recipe's resampling seed (null when the recipe has no resampling).</summary>
    [JsonPropertyName("resampling_seed")]
    public long? ResamplingSeed { get; set; }

    /// <summary>The unit's own stream seed, 16 hex digits, derived from the recipe's seed, the serial and the file's SHA-256.</summary>
    [JsonPropertyName("resampling_stream")]
    public string? ResamplingStream { get; set; }

    [JsonPropertyName("resampling_scheme")]
    public string? ResamplingScheme { get; set; }

    [JsonPropertyName("resampling_resamples")]
    public int? ResamplingResamples { get; set; }

    [JsonPropertyName("resampling_failed")]
    public int? ResamplingFailed { get; set; }

    /// <summary>Jackknife and bootstrap figures: one element per figure and method.</summary>
    [JsonPropertyName("resampling")]
    public List<ResamplingRecord> Resampling { get; set; } = [];

    [JsonPropertyName("processed_at")]
    [ParquetTimestamp(ParquetTimestampResolution.Milliseconds, useLogicalTimestamp: true, isAdjustedToUTC: true)]
    public DateTime ProcessedAt { get; set; }

    [JsonPropertyName("tool_version")]
    [ParquetRequired]
    public string ToolVersion { get; set; } = "";
}
