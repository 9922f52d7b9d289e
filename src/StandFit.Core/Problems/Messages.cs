using System.Globalization;

namespace StandFit.Core.Problems;

/// <summary>
/// Every message the tool shows about user input, in one place, so wording stays consistent and
/// each one says what is wrong and how to fix it.
/// </summary>
public static class Messages
{
    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);

    // ---- sweep files -------------------------------------------------------------------------
    public static string EmptyFile() => "the file is empty; the stand wrote no data. Re-run the sweep or check the stand's export.";
    public static string BinaryFile(int offset) => F($"byte {offset} is not text (NUL or a control byte); the file is not a sweep export. Check that the stand writes plain text.");
    public static string Utf16File() => "the file is UTF-16 text; sweep files must be UTF-8. Set the stand's export encoding to UTF-8.";
    public static string InvalidUtf8(int offset) => F($"byte {offset} is not valid UTF-8 (a legacy code page such as Windows-1252?). Set the stand's export encoding to UTF-8.");
    public static string FileTooLarge(long bytes, long limit) => F($"the file has {bytes} bytes, over the limit of {limit}; a sweep file is far smaller. Check the stand's export, or raise 'max_file_bytes' in the configuration.");
    public static string LineTooLong(int length, int limit) => F($"the line has {length} characters, over the limit of {limit}. Check the stand's export.");
    public static string BadMetadataLine() => "a metadata line must read '# key: value' with a non-empty key. Fix or remove the line.";
    public static string DuplicateMetadata(string key, int firstLine) => F($"metadata key '{key}' is given again with a different value (first on line {firstLine}). Keep one.");
    public static string MissingSerial() => "the file names no serial ('# serial: ...') and its file name gives none. Add the serial line.";
    public static string BadSerial(string shown) => F($"serial '{shown}' holds a path separator, a control character or more than 64 characters. Fix the stand's serial entry.");
    public static string BadTestStart(string shown) => F($"'test start' value '{shown}' is not an ISO 8601 date and time with a zone (for example 2026-11-30T22:14:05Z or 2026-11-30T23:14:05+01:00). Fix the stand's clock export.");
    public static string NoHeader() => "there is no header row of column names after the metadata lines. Add the header row.";
    public static string EmptyColumnName(int column) => F($"column {column} of the header has no name. Name every column.");
    public static string DuplicateColumn(string name, int firstColumn) => F($"column name '{name}' appears twice (first as column {firstColumn}). Give each column its own name.");
    public static string NoRows() => "the header is followed by no data rows; the sweep was not recorded. Re-run the sweep.";
    public static string WrongColumnCount(int cells, int expected) => F($"the row has {cells} cells but the header has {expected} columns (a truncated row?). Re-export the sweep.");
    public static string MissingColumn(string role, string name, IEnumerable<string> header) => F($"the recipe's {role} column '{name}' is not in the header ({string.Join(", ", header)}). Fix the recipe's 'columns' or the stand's export.");
    public static string BadNumber(string column, string shown) => F($"'{shown}' in column '{column}' is not a number (numbers use a decimal point, no thousands separator). Fix the row or re-export.");
    public static string NonFinite(string column, string shown) => F($"'{shown}' in column '{column}' is not a finite number. The stand recorded no valid reading here; re-run the sweep.");
    public static string BadLeg(string column, string shown) => F($"'{shown}' in leg column '{column}' must be 'up' or 'down'. Fix the row or the recipe's 'columns: leg'.");
    public static string NoRecipe(string key, string value) => F($"no recipe lists {key} '{value}'. Add the part to a recipe's 'parts' list; the unit was not judged.");
    public static string NoPartMetadata(string key) => F($"the file has no '# {key}: ...' line, so no recipe can be chosen. Add the line to the stand's export.");

    // ---- recipes and configuration -----------------------------------------------------------
    public static string RecipeYamlSyntax(string detail) => F($"this is not valid YAML: {detail}. Check indentation and colons near this place.");
    public static string RecipeMultipleDocuments() => "a recipe file holds one YAML document; remove the second '---' and what follows, or move it to its own file.";
    public static string RecipeAliasRefused() => "anchors and aliases ('&name', '*name') are not supported in recipes; write the values out.";
    public static string RecipeTagRefused(string tag) => F($"YAML tags such as '{tag}' are not supported in recipes; remove the tag.");
    public static string RecipeComplexKey() => "a key must be plain text.";
    public static string RecipeEmptyFile() => "the recipe file is empty; write at least 'recipe:', 'parts:', 'columns:', 'model:' and 'confidence:'.";
    public static string UnknownKey(string key, string where, string? suggestion, IEnumerable<string> known) =>
        suggestion is not null
            ? F($"unknown key '{key}' in {where}; did you mean '{suggestion}'?")
            : F($"unknown key '{key}' in {where}; the keys here are: {string.Join(", ", known)}.");
    public static string DuplicateKey(string key, int firstLine) => F($"key '{key}' is given twice (first on line {firstLine}); YAML would silently keep the last one. Keep one.");
    public static string MissingKey(string key, string where) => F($"{where} needs the key '{key}'.");
    public static string ExpectedMap(string where) => F($"{where} must be a mapping of 'key: value' lines.");
    public static string ExpectedList(string where) => F($"{where} must be a list, such as [a, b] or lines starting with '- '.");
    public static string ExpectedScalar(string where) => F($"{where} must be a single value, not a list or a mapping.");
    public static string EmptyValue(string where, string kind) => F($"{where} is empty; give {kind}. An empty value is never read as 0 or as a default.");
    public static string NotANumber(string where, string shown) => F($"{where} must be a number, not '{shown}'.");
    public static string QuotedNumber(string where, string shown) => F($"{where} must be a number without quotes: write {shown}.");
    public static string BooleanTrap(string where, string shown, string kind) => kind == "text"
        ? F($"'{shown}' in {where} is read by YAML 1.1 tools as a true/false value, not as text. Write it in quotes: \"{shown}\".")
        : F($"'{shown}' in {where} is read by YAML 1.1 tools as a true/false value, not as {kind}. Write {kind} here.");
    public static string OctalTrap(string where, string shown) => F($"'{shown}' in {where} has a leading zero, which YAML 1.1 tools read as an octal number. Write it without the leading zero, or in quotes if it is text.");
    public static string Base60Trap(string where, string shown) => F($"'{shown}' in {where} looks like a base-60 number (YAML 1.1 reads 1:30 as 90). Write a plain decimal number, or quote it if it is text.");
    public static string NotABoolean(string where, string shown) => F($"{where} must be true or false, not '{shown}'.");
    public static string GuardedNeedsUncertainty(string figure) => F($"limit on '{figure}' uses the guarded rule, but '{figure}' has no uncertainty of its own; give it 'rule: simple'.");
    public static string NeedsLegColumn(string where) => F($"{where} needs 'columns.leg' so the legs can be told apart.");
    public static string NeedsRange(string where) => F($"{where} needs 'sweep.range' (the nominal stimulus range).");
    public static string NominalNeeded(string figure) => F($"limit on '{figure}', an error against the nominal curve, but the recipe has no 'nominal' section; add 'nominal: {{ offset: ..., gain: ... }}'.");
    public static string DecisionNeeded() => "the recipe has limits but no 'decision' section; say 'decision: {{ rule: guarded }}' or 'rule: simple' so the decision rule is agreed, not assumed.";
    public static string CoverageWithoutGuarded(string where) => F($"{where} gives a coverage factor but the rule is 'simple'; remove 'coverage_factor' or use 'rule: guarded'.");
    public static string DerivedNeedsOneKey(string where) => F($"{where} needs exactly one of 'sensitivity_at' or 'value_at'.");
    public static string DerivedNameClash(string name) => F($"derived figure '{name}' has the name of a figure the fit already produces; choose another name.");
    public static string PartsNeeded() => "a recipe that is not 'family: true' needs 'parts' (the part numbers it judges).";
    public static string FamilyNotFound(string name, IEnumerable<string> known) => F($"'extends: {name}' names no family recipe in this folder; the family recipes are: {string.Join(", ", known)}.");
    public static string FamilyCycle(string name) => F($"'extends: {name}' leads back to this recipe; a family chain must end.");
    public static string NotAnInteger(string where, string shown) => F($"{where} must be a whole number, not '{shown}'.");
    public static string OutOfRange(string where, string shown, string range) => F($"{where} is {shown}; it must be {range}.");
    public static string UnknownChoice(string where, string shown, IEnumerable<string> choices, string? suggestion) =>
        suggestion is not null
            ? F($"{where} is '{shown}'; did you mean '{suggestion}'? The choices are: {string.Join(", ", choices)}.")
            : F($"{where} is '{shown}'; the choices are: {string.Join(", ", choices)}.");
    public static string MinAboveMax(string where, string min, string max) => F($"{where} has min {min} above max {max}; swap them or fix one.");
    public static string LimitNeedsBound(string where) => F($"{where} needs 'min', 'max' or both.");
    public static string UnknownFigure(string figure, string model, IEnumerable<string> figures) => F($"limit on '{figure}', but model {model} produces no such figure; its figures are: {string.Join(", ", figures)}.");
    public static string DegreeWithoutPolynomial(string model) => F($"'degree' applies only to model type 'polynomial', not '{model}'; remove it or change the type.");
    public static string EmptyList(string where) => F($"{where} is an empty list; name at least one.");
    public static string DuplicatePart(string part, string otherFile) => F($"part '{part}' is also listed by recipe file {otherFile}; a part must have exactly one recipe.");
    public static string UnreadableFile(string detail) => F($"the file cannot be read: {detail}.");
    public static string ConfigFolderMissing(string key, string path) => F($"folders.{key} is '{path}', which does not exist and cannot be created. Fix the path or create the folder.");

    // ---- data-quality gates -----------------------------------------------------------------
    public static string SweepTooFewPoints(int points, int min) => F($"the sweep has {points} points, fewer than the {min} the recipe expects; test the unit again.");
    public static string SweepSpanShort(double covered, double percent, double min, double max) => F($"the stimulus covers {Numbers.Format(covered, 4)} % of the range [{Numbers.Format(min)}, {Numbers.Format(max)}], less than the {Numbers.Format(percent)} % the recipe expects; check the stand's sweep and test the unit again.");
    public static string SweepLegMissing(string leg) => F($"the sweep has no {leg} leg, which the recipe expects; test the unit again.");
    public static string SweepLegNotMonotonic(string leg, int line, double from, double to) => F($"on the {leg} leg the stimulus turns back from {Numbers.Format(from)} to {Numbers.Format(to)} (line {line}); check the stand's actuator and test the unit again.");
    public static string SweepOutputSaturated(int count, double value) => F($"{count} points in a row read exactly {Numbers.Format(value)} at the end of the output range: the output looks clipped or saturated; check the unit and the stand's input range.");
    public static string SweepDuplicateRows(int first, int second) => F($"line {second} repeats line {first} exactly (stimulus, output and leg): the stand logged a row twice; test the unit again.");

    // ---- fits --------------------------------------------------------------------------------
    public static string TooFewPoints(int points, int parameters) => F($"{points} points cannot give error bars for {parameters} parameters (at least {parameters + 1} are needed). Check the sweep.");
    public static string ZeroStimulusSpread(double value) => F($"every stimulus value is {Numbers.Format(value)}: the stand did not sweep. Check the stand's actuator and reference.");
    public static string RankDeficient(int distinct, int parameters) => F($"the sweep has {distinct} distinct stimulus values, too few to separate {parameters} parameters. Check the sweep plan or the model.");
    public static string NonFiniteFit() => "the fit produced a non-finite number; the data are out of range for this model. Check the data and the model.";
    public static string InternalError(string exceptionType) => F($"the tool failed on this unit ({exceptionType}); the operations log has the details. Please report it.");

    // ---- findings ----------------------------------------------------------------------------
    public static string LimitFinding(string figure, string unit, double low, double high, string relation, double? min, double? max)
    {
        var limit = relation switch
        {
            "above" => max!.Value,
            "below" => min!.Value,
            _ => max ?? min ?? 0.0,
        };
        var digits = 5;
        foreach (var bound in new[] { min, max })
        {
            if (bound is { } edge)
            {
                digits = Math.Max(digits, Math.Max(Numbers.DigitsToTellApart(low, edge), Numbers.DigitsToTellApart(high, edge)));
            }
        }

        var interval = F($"[{Numbers.Format(low, digits)}, {Numbers.Format(high, digits)}]");
        var u = unit.Length == 0 ? "" : " " + unit;
        var limits = F($"[{(min is { } a ? Numbers.Format(a, digits) : "-inf")}, {(max is { } b ? Numbers.Format(b, digits) : "+inf")}]");
        return relation switch
        {
            "above" => F($"{figure} CI {interval}{u} lies above the upper limit {Numbers.Format(limit, digits)}"),
            "below" => F($"{figure} CI {interval}{u} lies below the lower limit {Numbers.Format(limit, digits)}"),
            "straddles" => F($"{figure} CI {interval}{u} straddles a limit of {limits}: the measurement cannot decide"),
            _ => F($"{figure} CI {interval}{u} lies inside the limits {limits}"),
        };
    }

    public static string LimitNotEvaluated(string figure) => F($"the limit on '{figure}' cannot decide: the figure could not be computed for this unit");

    public static string SimpleAcceptance() => "simple acceptance";

    public static string GuardByCoverage(double k) => F($"guarded, U = {Numbers.Format(k, 3)} u");

    public static string GuardByConfidence(double level, int? df) =>
        df is { } d ? F($"guarded, U = t({Numbers.Format(level * 100, 6)} %, {d} df) u") : F($"guarded, U = z({Numbers.Format(level * 100, 6)} %) u");

    public static string LimitDecision(Judging.LimitResult r, string unit, string basis)
    {
        var digits = 5;
        foreach (var bound in new[] { r.Min, r.Max })
        {
            if (bound is { } edge)
            {
                digits = Math.Max(digits, Math.Max(Numbers.DigitsToTellApart(r.Low, edge), Numbers.DigitsToTellApart(r.High, edge)));
                digits = Math.Max(digits, Numbers.DigitsToTellApart(r.Value, edge));
            }
        }

        string N(double v) => Numbers.Format(v, digits);
        var u = unit.Length == 0 ? "" : " " + unit;
        var limits = F($"[{(r.Min is { } a ? N(a) : "-inf")}, {(r.Max is { } b ? N(b) : "+inf")}]");
        var subject = r.Rule == Judging.DecisionRule.Simple
            ? F($"{r.Figure} {N(r.Value)}{u}")
            : F($"{r.Figure} {N(r.Value)} +/- {Numbers.Format(r.ExpandedUncertainty, 3)}{u} = [{N(r.Low)}, {N(r.High)}]");
        return r.Zone switch
        {
            Judging.LimitZone.Above => F($"{subject} lies above the upper limit {N(r.Max!.Value)} ({basis})"),
            Judging.LimitZone.Below => F($"{subject} lies below the lower limit {N(r.Min!.Value)} ({basis})"),
            Judging.LimitZone.Straddles => F($"{subject} straddles a limit of {limits} ({basis}): undecided, conditional {r.Conditional}"),
            _ => F($"{subject} lies inside the limits {limits} ({basis})"),
        };
    }

    public static string RunsFinding(int runs, int plus, int minus, double expected, double z, double p, string method, double floor, bool structure) =>
        structure
            ? F($"runs test in stimulus order: {runs} runs of {plus}+/{minus}- signs (expected {Numbers.Format(expected, 4)}, z = {Numbers.Format(z, 3)}), p = {Numbers.Format(p, 3)} ({method}) is below the floor {Numbers.Format(floor)}: the residuals have structure")
            : F($"runs test in stimulus order: {runs} runs of {plus}+/{minus}- signs (expected {Numbers.Format(expected, 4)}, z = {Numbers.Format(z, 3)}), p = {Numbers.Format(p, 3)} ({method}) is at or above the floor {Numbers.Format(floor)}");

    public static string RunsNotApplicable(int plus, int minus) => F($"runs test not applicable: {plus} positive and {minus} negative residuals");

    // ---- diagnostic gates -----------------------------------------------------------------------
    private static string Floor(double p, double floor, bool below) =>
        below ? F($"p = {Numbers.Format(p, 3)} is below the floor {Numbers.Format(floor)}") : F($"p = {Numbers.Format(p, 3)} is at or above the floor {Numbers.Format(floor)}");

    public static string DurbinWatsonFinding(double d, double p, double floor, bool below) =>
        below
            ? F($"Durbin-Watson d = {Numbers.Format(d, 4)} on the residuals in acquisition order, exact one-sided {Floor(p, floor, below)}: neighbouring residuals are alike (a drift, or a trend the model misses); check the stand and the model")
            : F($"Durbin-Watson d = {Numbers.Format(d, 4)} on the residuals in acquisition order, exact one-sided {Floor(p, floor, below)}");

    public static string LackOfFitFinding(double f, int lackDf, int pureDf, int setPoints, double p, double floor, bool below) =>
        below
            ? F($"lack of fit F = {Numbers.Format(f, 4)} on {lackDf} and {pureDf} df (pure error from {setPoints} set points), {Floor(p, floor, below)}: the model misses the set-point means by more than the replicates scatter")
            : F($"lack of fit F = {Numbers.Format(f, 4)} on {lackDf} and {pureDf} df (pure error from {setPoints} set points), {Floor(p, floor, below)}");

    public static string CurvatureFinding(int power, double f, int df, double p, double floor, bool below) =>
        below
            ? F($"the next power x^{power} has partial F = {Numbers.Format(f, 4)} on 1 and {df} df, {Floor(p, floor, below)}: the curve bends more than the model allows")
            : F($"the next power x^{power} has partial F = {Numbers.Format(f, 4)} on 1 and {df} df, {Floor(p, floor, below)}");

    public static string NormalityFinding(string test, string statistic, double value, double p, double floor, bool below) =>
        below
            ? F($"{test} {statistic} = {Numbers.Format(value, 4)} on the residuals, {Floor(p, floor, below)}: the residuals are not normal (an outlier, a mixture of populations or structure)")
            : F($"{test} {statistic} = {Numbers.Format(value, 4)} on the residuals, {Floor(p, floor, below)}");

    public static string HeteroscedasticityFinding(double bp, int df, double p, double floor, bool below) =>
        below
            ? F($"Breusch-Pagan (studentized) BP = {Numbers.Format(bp, 4)} on {df} df, {Floor(p, floor, below)}: the scatter of the residuals changes along the sweep")
            : F($"Breusch-Pagan (studentized) BP = {Numbers.Format(bp, 4)} on {df} df, {Floor(p, floor, below)}");

    public static string OutlierFinding(double r, int point, int line, int df, double p, double floor, bool below) =>
        below
            ? F($"the largest studentized residual |t| = {Numbers.Format(r, 4)} (point {point}, line {line}) on {df} df, Bonferroni {Floor(p, floor, below)}: that reading is an outlier; check the stand and the unit, and test again")
            : F($"the largest studentized residual |t| = {Numbers.Format(r, 4)} (point {point}, line {line}) on {df} df, Bonferroni {Floor(p, floor, below)}");

    public static string DiagnosticNotApplicable(string test) => F($"the {test} cannot be made on this fit (too few points or set points, no replicates, or no scatter left); the gate does not judge");
}
