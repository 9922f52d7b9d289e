using System.Collections.Immutable;

namespace StandFit.Core.Problems;

/// <summary>What a reason does to a ruling.</summary>
public enum ReasonKind
{
    /// <summary>The input could not be judged: the unit is rejected.</summary>
    Reject,

    /// <summary>The unit is outside specification.</summary>
    Fail,

    /// <summary>The measurement cannot decide: test the unit again.</summary>
    Retest,

    /// <summary>A check that passed, recorded for the audit trail.</summary>
    Pass,
}

/// <summary>One stable reason identifier and what it means. Codes never change once shipped.</summary>
public sealed record ReasonCode(string Code, ReasonKind Kind, string Meaning);

/// <summary>
/// Every reason code the tool writes, in one place. Limit codes are prefixed by the figure they judge
/// (<c>gain.above_limit</c>, <c>offset.straddles_limit</c>); the registry holds them with the
/// placeholder <c>{figure}</c>. docs/reasons.md is checked against this list by a test.
/// </summary>
public static class ReasonCodes
{
    public const string FigurePlaceholder = "{figure}";

    // Input that cannot be judged.
    public static readonly ReasonCode InputEmpty = new("input.empty", ReasonKind.Reject, "The file holds no bytes, or only blank lines.");
    public static readonly ReasonCode InputBinary = new("input.binary", ReasonKind.Reject, "The file holds bytes that are not text (NUL or other control bytes).");
    public static readonly ReasonCode InputEncoding = new("input.encoding", ReasonKind.Reject, "The file is not valid UTF-8 (for example UTF-16 or a legacy code page).");
    public static readonly ReasonCode InputTooLarge = new("input.too_large", ReasonKind.Reject, "The file is larger than the configured size limit.");
    public static readonly ReasonCode InputLineTooLong = new("input.line_too_long", ReasonKind.Reject, "A line is longer than the reader accepts.");
    public static readonly ReasonCode InputBadMetadata = new("input.bad_metadata", ReasonKind.Reject, "A metadata line is not of the form '# key: value'.");
    public static readonly ReasonCode InputDuplicateMetadata = new("input.duplicate_metadata", ReasonKind.Reject, "A metadata key appears twice with different values.");
    public static readonly ReasonCode InputBadSerial = new("input.bad_serial", ReasonKind.Reject, "The serial is missing, too long, or holds path separators or control characters.");
    public static readonly ReasonCode InputNoHeader = new("input.no_header", ReasonKind.Reject, "There is no header row of column names.");
    public static readonly ReasonCode InputDuplicateColumn = new("input.duplicate_column", ReasonKind.Reject, "Two columns of the header have the same name.");
    public static readonly ReasonCode InputNoRows = new("input.no_rows", ReasonKind.Reject, "The header is followed by no data rows.");
    public static readonly ReasonCode InputWrongColumnCount = new("input.wrong_column_count", ReasonKind.Reject, "A data row has more or fewer cells than the header.");
    public static readonly ReasonCode InputMissingColumn = new("input.missing_column", ReasonKind.Reject, "A column the recipe names is not in the header.");
    public static readonly ReasonCode InputBadNumber = new("input.bad_number", ReasonKind.Reject, "A cell that must hold a number does not.");
    public static readonly ReasonCode InputNonFinite = new("input.non_finite", ReasonKind.Reject, "A cell holds NaN or an infinity.");
    public static readonly ReasonCode InputBadLeg = new("input.bad_leg", ReasonKind.Reject, "A leg cell is neither 'up' nor 'down'.");
    public static readonly ReasonCode InputBadUncertainty = new("input.bad_uncertainty", ReasonKind.Reject, "A reading's standard uncertainty (from the uncertainty column or the recipe's weights rule) is zero, negative or not finite.");
    public static readonly ReasonCode InputTruncated = new("input.truncated", ReasonKind.Reject, "The last data row has no line end: the file was cut off (still being written, or the export stopped).");
    public static readonly ReasonCode InputWrongSeparator = new("input.wrong_separator", ReasonKind.Reject, "The header is not split by the cell separator the recipe expects (',' or, with a declared decimal comma, ';').");
    public static readonly ReasonCode InputDuplicate = new("input.duplicate", ReasonKind.Reject, "The same bytes were already judged under the same recipe: not judged again, no new summary row.");
    public static readonly ReasonCode InputNoRecipe = new("input.no_recipe", ReasonKind.Reject, "No recipe lists the unit's part.");

    // Data-quality gates, before any fit: the measurement is in doubt, so the unit is tested again.
    public static readonly ReasonCode SweepTooFewPoints = new("sweep.too_few_points", ReasonKind.Retest, "The sweep has fewer points than the recipe's 'sweep.min_points'.");
    public static readonly ReasonCode SweepSpanShort = new("sweep.span_short", ReasonKind.Retest, "The stimulus covers less of the nominal range than the recipe's 'sweep.span_percent'.");
    public static readonly ReasonCode SweepLegMissing = new("sweep.leg_missing", ReasonKind.Retest, "A leg the recipe expects ('sweep.legs') is not in the sweep.");
    public static readonly ReasonCode SweepLegNotMonotonic = new("sweep.leg_not_monotonic", ReasonKind.Retest, "Within a leg the stimulus turns back by more than the recipe's tolerance.");
    public static readonly ReasonCode SweepOutputSaturated = new("sweep.output_saturated", ReasonKind.Retest, "A run of identical output values at the lowest or highest output: clipped or saturated output.");
    public static readonly ReasonCode SweepDuplicateRows = new("sweep.duplicate_rows", ReasonKind.Retest, "Two points have the same stimulus, output and leg: a duplicated row.");

    // Fits that cannot be made.
    public static readonly ReasonCode FitTooFewPoints = new("fit.too_few_points", ReasonKind.Reject, "Fewer points than the model has parameters, or no degree of freedom left for an error bar.");
    public static readonly ReasonCode FitZeroStimulusSpread = new("fit.zero_stimulus_spread", ReasonKind.Reject, "All stimulus values are equal: no curve can be fitted.");
    public static readonly ReasonCode FitRankDeficient = new("fit.rank_deficient", ReasonKind.Reject, "The stimulus values cannot separate the model's parameters (too few distinct set points).");
    public static readonly ReasonCode FitDomain = new("fit.domain", ReasonKind.Reject, "A point lies outside the model's domain (for example ln of a stimulus that is not positive); the message names its line.");
    public static readonly ReasonCode FitNonFinite = new("fit.non_finite", ReasonKind.Reject, "The fit produced a non-finite number.");
    public static readonly ReasonCode FitNotConverged = new("fit.not_converged", ReasonKind.Reject, "The nonlinear fit of an expression model did not converge (iteration limit); its estimates are not a solution.");
    public static readonly ReasonCode FitAtBound = new("fit.at_bound", ReasonKind.Reject, "A parameter of an expression model ended on one of the bounds the recipe sets: its estimate and standard error do not describe a least-squares solution.");

    // A bug in the tool: the unit is rejected and the worker goes on.
    public static readonly ReasonCode InternalError = new("internal.error", ReasonKind.Reject, "The tool failed on this unit; the operations log has the stack trace.");

    // Limits on a figure (guarded acceptance).
    public static readonly ReasonCode LimitWithin = new("{figure}.within_limits", ReasonKind.Pass, "The figure's whole confidence interval lies inside its limits.");
    public static readonly ReasonCode LimitAbove = new("{figure}.above_limit", ReasonKind.Fail, "The figure's whole confidence interval lies above its upper limit.");
    public static readonly ReasonCode LimitBelow = new("{figure}.below_limit", ReasonKind.Fail, "The figure's whole confidence interval lies below its lower limit.");
    public static readonly ReasonCode LimitStraddles = new("{figure}.straddles_limit", ReasonKind.Retest, "The figure's confidence interval contains a limit: the measurement cannot decide.");

    public static readonly ReasonCode LimitNotEvaluated = new("limit.not_evaluated", ReasonKind.Retest, "A limit's figure could not be computed for this unit (for example a runs-test figure when the residuals have no signs); the limit cannot decide.");

    // Residual-structure gates.
    public static readonly ReasonCode RunsOk = new("residuals.runs_ok", ReasonKind.Pass, "The runs test on the signs of the residuals in stimulus order finds no structure.");
    public static readonly ReasonCode RunsNotApplicable = new("residuals.runs_not_applicable", ReasonKind.Pass, "The residuals have too few signs of each kind for a runs test (for example an exact fit); the gate does not judge.");
    public static readonly ReasonCode RunsStructure = new("residuals.runs_structure", ReasonKind.Fail, "Too few (or too many) runs of residual signs in stimulus order: the model does not describe the unit.");

    // Resampling (jackknife and bootstrap).
    public static readonly ReasonCode ResamplingTooManyFailures = new("resampling.too_many_failures", ReasonKind.Retest, "More bootstrap resamples could not be fitted (no stimulus spread, rank deficient; for an expression model also not converged or on a bound) than the recipe's 'resampling.max_failed_percent' allows.");
    public static readonly ReasonCode ResamplingInfluentialPoint = new("resampling.influential_point", ReasonKind.Pass, "The delete-one jackknife names the point whose deletion moves the gain most, with its line in the sweep file.");
    public static readonly ReasonCode ResamplingJackknifeUnavailable = new("resampling.jackknife_unavailable", ReasonKind.Pass, "A delete-one deletion leaves a sweep that cannot be fitted: no jackknife figures and no BCa intervals for this unit (a limit that needs them is not evaluated).");

    // Diagnostic gates (recipe 'gates'): each fails the unit when its p-value is below the recipe's floor.
    public static readonly ReasonCode DurbinWatsonOk = new("residuals.durbin_watson_ok", ReasonKind.Pass, "The Durbin-Watson test on the residuals in acquisition order finds no positive autocorrelation.");
    public static readonly ReasonCode Autocorrelated = new("residuals.autocorrelated", ReasonKind.Fail, "The Durbin-Watson exact p-value is below the floor: neighbouring residuals in acquisition order are alike (a drift or a missed trend).");
    public static readonly ReasonCode DurbinWatsonNotApplicable = new("residuals.durbin_watson_not_applicable", ReasonKind.Pass, "The Durbin-Watson test cannot be made on this fit (too few points, or an exact fit); the gate does not judge.");
    public static readonly ReasonCode LackOfFitOk = new("residuals.lack_of_fit_ok", ReasonKind.Pass, "The lack-of-fit test against pure error from replicated set points finds no lack of fit.");
    public static readonly ReasonCode LackOfFit = new("residuals.lack_of_fit", ReasonKind.Fail, "The lack-of-fit p-value is below the floor: the model misses the set-point means by more than the replicates scatter.");
    public static readonly ReasonCode LackOfFitNotApplicable = new("residuals.lack_of_fit_not_applicable", ReasonKind.Pass, "The lack-of-fit test cannot be made: no replicated set points, or no more set points than parameters; the gate does not judge.");
    public static readonly ReasonCode CurvatureOk = new("residuals.curvature_ok", ReasonKind.Pass, "The partial F test of the next polynomial power finds no curvature the model misses.");
    public static readonly ReasonCode Curvature = new("residuals.curvature", ReasonKind.Fail, "The curvature p-value is below the floor: the next polynomial power explains part of the residuals.");
    public static readonly ReasonCode CurvatureNotApplicable = new("residuals.curvature_not_applicable", ReasonKind.Pass, "The curvature test cannot be made (a model that is not a polynomial, or too few points or set points); the gate does not judge.");
    public static readonly ReasonCode NormalityOk = new("residuals.normality_ok", ReasonKind.Pass, "The normality test of the residuals (Shapiro-Wilk or Anderson-Darling) finds no departure from normality.");
    public static readonly ReasonCode NotNormal = new("residuals.not_normal", ReasonKind.Fail, "The normality test's p-value is below the floor: the residuals are not normal.");
    public static readonly ReasonCode NormalityNotApplicable = new("residuals.normality_not_applicable", ReasonKind.Pass, "The normality test cannot be made (too few or too many points, or residuals without scatter); the gate does not judge.");
    public static readonly ReasonCode VarianceOk = new("residuals.variance_ok", ReasonKind.Pass, "The Breusch-Pagan test finds no change of the residual variance along the sweep.");
    public static readonly ReasonCode Heteroscedastic = new("residuals.heteroscedastic", ReasonKind.Fail, "The Breusch-Pagan p-value is below the floor: the residual variance changes along the sweep.");
    public static readonly ReasonCode HeteroscedasticityNotApplicable = new("residuals.heteroscedasticity_not_applicable", ReasonKind.Pass, "The Breusch-Pagan test cannot be made on this fit; the gate does not judge.");
    public static readonly ReasonCode OutliersOk = new("residuals.outliers_ok", ReasonKind.Pass, "The Bonferroni test of the largest studentized residual finds no outlier.");
    public static readonly ReasonCode Outlier = new("residuals.outlier", ReasonKind.Fail, "The Bonferroni-adjusted p-value of the largest studentized residual is below the floor: one reading is an outlier.");
    public static readonly ReasonCode OutliersNotApplicable = new("residuals.outliers_not_applicable", ReasonKind.Pass, "The outlier test cannot be made (too few degrees of freedom); the gate does not judge.");

    public static ImmutableArray<ReasonCode> All { get; } =
    [
        InputEmpty, InputBinary, InputEncoding, InputTooLarge, InputLineTooLong, InputBadMetadata,
        InputDuplicateMetadata, InputBadSerial, InputNoHeader, InputDuplicateColumn, InputNoRows,
        InputWrongColumnCount, InputMissingColumn, InputBadNumber, InputNonFinite, InputBadLeg, InputBadUncertainty, InputTruncated, InputWrongSeparator,
        InputDuplicate, InputNoRecipe,
        SweepTooFewPoints, SweepSpanShort, SweepLegMissing, SweepLegNotMonotonic, SweepOutputSaturated, SweepDuplicateRows,
        FitTooFewPoints, FitZeroStimulusSpread, FitRankDeficient, FitDomain, FitNonFinite, FitNotConverged, FitAtBound,
        InternalError,
        LimitWithin, LimitAbove, LimitBelow, LimitStraddles, LimitNotEvaluated,
        RunsOk, RunsNotApplicable, RunsStructure,
        ResamplingTooManyFailures, ResamplingInfluentialPoint, ResamplingJackknifeUnavailable,
        DurbinWatsonOk, Autocorrelated, DurbinWatsonNotApplicable,
        LackOfFitOk, LackOfFit, LackOfFitNotApplicable,
        CurvatureOk, Curvature, CurvatureNotApplicable,
        NormalityOk, NotNormal, NormalityNotApplicable,
        VarianceOk, Heteroscedastic, HeteroscedasticityNotApplicable,
        OutliersOk, Outlier, OutliersNotApplicable,
    ];

    /// <summary>The registry entry of a concrete code (<c>gain.above_limit</c> finds <c>{figure}.above_limit</c>), or null.</summary>
    public static ReasonCode? Find(string code)
    {
        foreach (var entry in All)
        {
            if (entry.Code == code)
            {
                return entry;
            }

            if (entry.Code.StartsWith(FigurePlaceholder, StringComparison.Ordinal)
                && code.Length > entry.Code.Length - FigurePlaceholder.Length
                && code.EndsWith(entry.Code[FigurePlaceholder.Length..], StringComparison.Ordinal))
            {
                return entry;
            }
        }

        return null;
    }

    /// <summary>The concrete code of a figure's limit reason: <c>gain.above_limit</c>.</summary>
    public static string ForFigure(ReasonCode template, string figure) =>
        template.Code.Replace(FigurePlaceholder, figure, StringComparison.Ordinal);
}
