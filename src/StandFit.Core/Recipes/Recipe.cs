using System.Collections.Immutable;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Judging;
using StandFit.Core.Screening;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Recipes;

/// <summary>Which units' sweep points go to the per-point table (the recipe's <c>output.points</c>).</summary>
public enum PointsOutput
{
    /// <summary>Every fitted unit's points (the default).</summary>
    All,

    /// <summary>Only the points of units ruled fail or retest: the ones an engineer draws and looks at.</summary>
    Flagged,

    /// <summary>No points: the summary row alone.</summary>
    None,
}

/// <summary>Units of the stimulus (input) and output columns, as the recipe states them (free text, e.g. "kPa", "mV").</summary>
public sealed record ColumnUnits
{
    public ColumnUnits(string stimulus, string output)
        : this([stimulus], output)
    {
    }

    /// <summary>One unit per input column, and the output's.</summary>
    public ColumnUnits(ImmutableArray<string> inputs, string output)
    {
        Inputs = inputs.IsDefaultOrEmpty ? [""] : inputs;
        Output = output;
    }

    public static ColumnUnits None { get; } = new("", "");

    public ImmutableArray<string> Inputs { get; }

    /// <summary>The unit of the first (or only) input.</summary>
    public string Stimulus => Inputs[0];

    public string Output { get; }

    public bool Equals(ColumnUnits? other) =>
        other is not null && Inputs.SequenceEqual(other.Inputs, StringComparer.Ordinal) && Output == other.Output;

    public override int GetHashCode() => HashCode.Combine(string.Join('\u001f', Inputs), Output);
}

/// <summary>
/// The recipe's rule for the standard uncertainty of each output reading when the file has no
/// uncertainty column: u = Fixed + Relative |y|, y the reading as recorded (output units). The fit
/// is then weighted with w = 1/u^2.
/// </summary>
public sealed record WeightRule
{
    public WeightRule(double @fixed, double relative)
    {
        if (!(@fixed >= 0) || !(relative >= 0) || !double.IsFinite(@fixed) || !double.IsFinite(relative) || (@fixed == 0 && relative == 0))
        {
            throw new ArgumentOutOfRangeException(nameof(@fixed), "A weight rule needs u_fixed >= 0 and u_relative >= 0, not both 0.");
        }

        Fixed = @fixed;
        Relative = relative;
    }

    /// <summary>a: the part of u that does not depend on the reading, in output units.</summary>
    public double Fixed { get; }

    /// <summary>b: the part of u per unit of |reading| (0.001 is 0.1 % of reading).</summary>
    public double Relative { get; }

    public double UncertaintyOf(double reading) => Fixed + (Relative * Math.Abs(reading));
}

/// <summary>
/// How one part family is fitted and judged: the immutable form the core works with. The recipe
/// files (YAML) are read into this by the edge that loads them.
/// </summary>
public sealed class Recipe
{
    public Recipe(
        string name,
        string version,
        ImmutableArray<string> parts,
        ColumnMap columns,
        ColumnUnits units,
        CurveModel model,
        ConfidenceLevel confidence,
        ImmutableArray<FigureLimit> limits,
        RunsGate? runsGate,
        string contentHash,
        string sourceFile,
        WeightRule? weights = null,
        SweepFormat? format = null)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(name);
        if (columns.Inputs.Length != model.InputCount)
        {
            throw new ArgumentException($"Model {model.Name} takes {model.InputCount} input(s); the recipe names {columns.Inputs.Length}.", nameof(columns));
        }

        if (weights is not null && columns.Uncertainty is not null)
        {
            throw new ArgumentException("Weights come from the uncertainty column or from a rule, not both.", nameof(weights));
        }

        Name = name;
        Version = version;
        Parts = parts;
        Columns = columns;
        Units = units;
        Model = model;
        Confidence = confidence;
        Limits = limits;
        RunsGate = runsGate;
        ContentHash = contentHash;
        SourceFile = sourceFile;
        Weights = weights;
        Format = format ?? SweepFormat.Standard;
    }

    public string Name { get; }

    /// <summary>The recipe's own version text, as its author wrote it.</summary>
    public string Version { get; }

    /// <summary>Part numbers this recipe judges (matched against the sweep's <c>part</c> metadata).</summary>
    public ImmutableArray<string> Parts { get; }

    public ColumnMap Columns { get; }

    /// <summary>How the part's sweep files write cells and numbers (decimal point unless the recipe declares a comma).</summary>
    public SweepFormat Format { get; }

    public ColumnUnits Units { get; }

    /// <summary>The model fitted: a <see cref="LinearModel"/> (least squares by QR) or an <see cref="Fitting.Nonlinear.ExpressionModel"/> (Levenberg-Marquardt).</summary>
    public CurveModel Model { get; }

    public ConfidenceLevel Confidence { get; }

    public ImmutableArray<FigureLimit> Limits { get; }

    public RunsGate? RunsGate { get; }

    /// <summary>Figures computed from the curve at stimulus points (sensitivity, value), which limits can name.</summary>
    public ImmutableArray<DerivedFigure> Derived { get; init; } = [];

    /// <summary>Jackknife and bootstrap error bars (<c>resampling:</c>); null when the recipe asks for none.</summary>
    public Uncertainty.Resampling.ResamplingPlan? Resampling { get; init; }

    /// <summary>The residual-structure gates on the diagnostics (Durbin-Watson, lack of fit, curvature, normality, variance, outliers), in recipe order.</summary>
    public ImmutableArray<DiagnosticGate> DiagnosticGates { get; init; } = [];

    /// <summary>How set points are told apart (lack of fit, figures of merit): stimulus values within this of a neighbour are one set point; 0 groups equal values only.</summary>
    public double SetPointTolerance { get; init; }

    /// <summary>The part's nominal transfer curve (zero, span and largest error); null when the recipe gives none.</summary>
    public Merit.NominalLine? Nominal { get; init; }

    /// <summary>The options the residual diagnostics take from this recipe.</summary>
    public Diagnostics.DiagnosticsOptions DiagnosticsOptions => new()
    {
        SetPointTolerance = SetPointTolerance,
        Nominal = Nominal,
        DurbinWatsonOrder = DiagnosticGates.FirstOrDefault(g => g.Kind == DiagnosticGateKind.DurbinWatson)?.Order ?? Diagnostics.ResidualOrder.Acquisition,
        AlsoDurbinWatson = [.. Evaluation.FigureTable.DurbinWatsonOrdersNamed(Limits.Select(l => l.Figure))],
    };

    /// <summary>The data-quality gates checked before any fit.</summary>
    public SweepExpectations Sweep { get; init; } = SweepExpectations.None;

    /// <summary>Which units' points go to the per-point table (<c>output.points</c>; default all).</summary>
    public PointsOutput Points { get; init; } = PointsOutput.All;

    /// <summary>True when a unit of this recipe with this ruling keeps its points in the per-point table.</summary>
    public bool KeepsPoints(Ruling ruling) => Points switch
    {
        PointsOutput.All => true,
        PointsOutput.Flagged => ruling is Ruling.Fail or Ruling.Retest,
        _ => false,
    };

    /// <summary>File-name patterns (<c>*</c> and <c>?</c> wildcards) that select this recipe for files without part metadata.</summary>
    public ImmutableArray<string> FilePatterns { get; init; } = [];

    /// <summary>The family recipe this one extends, by name; null for a recipe that stands alone.</summary>
    public string? Extends { get; init; }

    /// <summary>True for a family recipe: others extend it; it judges no part itself.</summary>
    public bool IsFamily { get; init; }

    /// <summary>SHA-256 of the recipe file's bytes, lower-case hex: which exact recipe made a ruling.</summary>
    public string ContentHash { get; }

    /// <summary>The recipe file's name (no folder).</summary>
    public string SourceFile { get; }

    /// <summary>The rule for the readings' standard uncertainties, when the recipe gives one (weighted fit), or null.</summary>
    public WeightRule? Weights { get; }

    /// <summary>True when the fit is weighted: by the uncertainty column or by <see cref="Weights"/>.</summary>
    public bool IsWeighted => Weights is not null || Columns.Uncertainty is not null;

    /// <summary>The unit of a parameter, or of a derived quantity, of the model ("" when unknown).</summary>
    /// <summary>The unit of a sensitivity d output / d stimulus ("mA/kPa"), or "" when the recipe gives no units.</summary>
    public string UnitOfSensitivity() =>
        Units.Output.Length == 0 && Units.Stimulus.Length == 0 ? "" : $"{Units.Output}/{Units.Stimulus}";

    public string UnitOf(string parameter)
    {
        var index = Model.ParameterNames.IndexOf(parameter);
        if (index >= 0)
        {
            return Model.UnitOf(index, Units.Inputs, Units.Output);
        }

        var derived = Model.DerivedNames.IndexOf(parameter);
        return derived >= 0 ? Model.DerivedUnitOf(derived, Units.Inputs, Units.Output) : "";
    }
}
