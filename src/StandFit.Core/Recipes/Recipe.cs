using System.Collections.Immutable;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Evaluation;
using StandFit.Core.Judging;
using StandFit.Core.Screening;
using StandFit.Core.Uncertainty;

namespace StandFit.Core.Recipes;

/// <summary>Units of the stimulus and output columns, as the recipe states them (free text, e.g. "kPa", "mV").</summary>
public sealed record ColumnUnits(string Stimulus, string Output)
{
    public static ColumnUnits None { get; } = new("", "");

    /// <summary>The unit of a polynomial coefficient of the given power: output / stimulus^power.</summary>
    public string OfPower(int power) => power switch
    {
        _ when Output.Length == 0 && Stimulus.Length == 0 => "",
        0 => Output,
        1 => $"{Output}/{Stimulus}",
        _ => $"{Output}/{Stimulus}^{power.ToString(System.Globalization.CultureInfo.InvariantCulture)}",
    };
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
        LinearModel model,
        ConfidenceLevel confidence,
        ImmutableArray<FigureLimit> limits,
        RunsGate? runsGate,
        string contentHash,
        string sourceFile)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(name);
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
    }

    public string Name { get; }

    /// <summary>The recipe's own version text, as its author wrote it.</summary>
    public string Version { get; }

    /// <summary>Part numbers this recipe judges (matched against the sweep's <c>part</c> metadata).</summary>
    public ImmutableArray<string> Parts { get; }

    public ColumnMap Columns { get; }

    public ColumnUnits Units { get; }

    public LinearModel Model { get; }

    public ConfidenceLevel Confidence { get; }

    public ImmutableArray<FigureLimit> Limits { get; }

    public RunsGate? RunsGate { get; }

    /// <summary>Figures computed from the curve at stimulus points (sensitivity, value), which limits can name.</summary>
    public ImmutableArray<DerivedFigure> Derived { get; init; } = [];

    /// <summary>The residual-structure gates on the diagnostics (Durbin-Watson, lack of fit, curvature, normality, variance, outliers), in recipe order.</summary>
    public ImmutableArray<DiagnosticGate> DiagnosticGates { get; init; } = [];

    /// <summary>How set points are told apart (lack of fit, figures of merit): stimulus values within this of a neighbour are one set point; 0 groups equal values only.</summary>
    public double SetPointTolerance { get; init; }

    /// <summary>The part's nominal transfer curve (zero, span and largest error); null when the recipe gives none.</summary>
    public Merit.NominalLine? Nominal { get; init; }

    /// <summary>The options the residual diagnostics take from this recipe.</summary>
    public Diagnostics.DiagnosticsOptions DiagnosticsOptions => new() { SetPointTolerance = SetPointTolerance, Nominal = Nominal };

    /// <summary>The data-quality gates checked before any fit.</summary>
    public SweepExpectations Sweep { get; init; } = SweepExpectations.None;

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

    /// <summary>The unit of a parameter of the model.</summary>
    public string UnitOf(string parameter)
    {
        var index = Model.ParameterNames.IndexOf(parameter);
        if (index < 0)
        {
            return "";
        }

        var lowest = Model.HasIntercept ? 0 : 1;
        return Units.OfPower(index + lowest);
    }
}
