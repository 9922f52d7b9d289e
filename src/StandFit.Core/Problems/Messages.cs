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
    public static string NotAnInteger(string where, string shown) => F($"{where} must be a whole number, not '{shown}'.");
    public static string OutOfRange(string where, string shown, string range) => F($"{where} is {shown}; it must be {range}.");
    public static string UnknownChoice(string where, string shown, IEnumerable<string> choices, string? suggestion) =>
        suggestion is not null
            ? F($"{where} is '{shown}'; did you mean '{suggestion}'? The choices are: {string.Join(", ", choices)}.")
            : F($"{where} is '{shown}'; the choices are: {string.Join(", ", choices)}.");
    public static string MinAboveMax(string where, string min, string max) => F($"{where} has min {min} above max {max}; swap them or fix one.");
    public static string LimitNeedsBound(string where) => F($"{where} needs 'min', 'max' or both.");
    public static string UnknownFigure(string figure, string model, IEnumerable<string> figures) => F($"limit on '{figure}', but model {model} produces no such figure; its figures are: {string.Join(", ", figures)}.");
    public static string DegreeWithoutPolynomial(string model) => KeyNotForModel("degree", "polynomial", model);
    public static string KeyNotForModel(string key, string owner, string model) => F($"'{key}' applies only to model type '{owner}', not '{model}'; remove it or change the type.");
    public static string ModelTakesOneInput(string model, int inputs) => F($"model type '{model}' takes one stimulus column, but 'columns.stimulus' names {inputs}; name one column, or use type 'basis' for a model of several inputs.");
    public static string TooManyInputs(int inputs, int limit) => F($"'columns.stimulus' names {inputs} columns; at most {limit} are allowed.");
    public static string DuplicateInput(string column, int first) => F($"column '{column}' is already stimulus {first} (header names are matched ignoring case); name each stimulus column once.");
    public static string UnitCountMismatch(int units, int inputs) => F($"'units.stimulus' gives {units} unit(s) for {inputs} stimulus column(s); give one unit per stimulus column, in the same order (a list when there are several).");
    public static string TermSyntax(string where, string term, int position, string expected) => F($"{where}: term '{term}' is not understood at character {position}: expected {expected}. Terms are 1, x, x^k, 1/x, sqrt(x), ln(x), ln(x)^k and products such as x1*x2.");
    public static string TermUnknownFunction(string where, string term, string function, string? suggestion) =>
        suggestion is not null
            ? F($"{where}: term '{term}' uses the function '{function}'; did you mean '{suggestion}'? The functions are ln and sqrt.")
            : F($"{where}: term '{term}' uses the function '{function}'; the functions are ln and sqrt.");
    public static string TermUnknownInput(string where, string term, string input, string? suggestion, IEnumerable<string> inputs) =>
        suggestion is not null
            ? F($"{where}: term '{term}' uses the input '{input}'; did you mean '{suggestion}'? The inputs are {string.Join(", ", inputs)} (the stimulus columns in order).")
            : F($"{where}: term '{term}' uses the input '{input}'; the inputs are {string.Join(", ", inputs)} (the stimulus columns in order).");
    public static string TermBadPower(string where, string term, string power, string expected) => F($"{where}: term '{term}' has the power '{power}'; write {expected}.");
    public static string UnusedInput(string where, string symbol, int column) => F($"{where}: no term uses {symbol} (stimulus column {column}); use it in a term or remove the column from 'columns.stimulus'.");
    public static string DuplicateTerm(string where, string term, string earlier) => F($"{where}: term '{term}' is the same function as the earlier term '{earlier}'; give each term once.");
    public static string TooManyTerms(string where, int terms, int limit) => F($"{where} has {terms} terms; at most {limit} are allowed.");
    public static string BadParameterName(string where, string name) => F($"{where}: '{name}' cannot name a parameter; use a letter followed by letters, digits or '_'.");
    public static string WeightsNeedSource(string where) => F($"{where} needs 'column' (the readings' standard uncertainties), or both 'u_fixed' and 'u_relative' (the rule u = u_fixed + u_relative * |reading|).");
    public static string WeightsTwoSources(string where) => F($"{where} has both 'column' and a rule ('u_fixed', 'u_relative'); the weights come from one of them. Remove one.");
    public static string WeightRuleZero(string where) => F($"{where}: 'u_fixed' and 'u_relative' are both 0, which gives every reading an infinite weight; make at least one above 0.");
    public static string EmptyList(string where) => F($"{where} is an empty list; name at least one.");
    public static string DuplicatePart(string part, string otherFile) => F($"part '{part}' is also listed by recipe file {otherFile}; a part must have exactly one recipe.");
    public static string UnreadableFile(string detail) => F($"the file cannot be read: {detail}.");
    public static string ConfigFolderMissing(string key, string path) => F($"folders.{key} is '{path}', which does not exist and cannot be created. Fix the path or create the folder.");

    // ---- fits --------------------------------------------------------------------------------
    public static string TooFewPoints(int points, int parameters) => F($"{points} points cannot give error bars for {parameters} parameters (at least {parameters + 1} are needed). Check the sweep.");
    public static string ZeroStimulusSpread(double value) => F($"every stimulus value is {Numbers.Format(value)}: the stand did not sweep. Check the stand's actuator and reference.");
    public static string RankDeficient(int distinct, int parameters) => F($"the sweep has {distinct} distinct stimulus values, too few to separate {parameters} parameters. Check the sweep plan or the model.");
    public static string ZeroInputSpread(string column, double value) => F($"every value of input column '{column}' is {Numbers.Format(value)}: the stand did not vary it, so its terms cannot be told from the constant. Check the stand, or drop the input from the model.");
    public static string Collinear(int parameters) => F($"the model's {parameters} terms cannot be told apart on this sweep (the design matrix is singular to working precision). Check the model's terms and the sweep plan.");
    public static string OutsideDomain(string column, string symbol, double value, string condition) => F($"{symbol} (column '{column}') is {Numbers.Format(value, 10)} on this line, but {condition}: the model cannot use this point. Check the reading, or choose a model whose terms admit it.");
    public static string ResponseOutsideDomain(double value, string condition) => F($"the output is {Numbers.Format(value, 10)} on this line, but {condition}. Check the reading and the recipe's 'model.temperature' unit.");
    public static string BadUncertainty(double value) => F($"the output's standard uncertainty is {Numbers.Format(value)} on this line; a weight 1/u^2 needs an uncertainty above 0. Check the uncertainty column or the recipe's 'weights' rule.");
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

    public static string RunsFinding(int runs, int plus, int minus, double expected, double z, double p, string method, double floor, bool structure) =>
        structure
            ? F($"runs test in stimulus order: {runs} runs of {plus}+/{minus}- signs (expected {Numbers.Format(expected, 4)}, z = {Numbers.Format(z, 3)}), p = {Numbers.Format(p, 3)} ({method}) is below the floor {Numbers.Format(floor)}: the residuals have structure")
            : F($"runs test in stimulus order: {runs} runs of {plus}+/{minus}- signs (expected {Numbers.Format(expected, 4)}, z = {Numbers.Format(z, 3)}), p = {Numbers.Format(p, 3)} ({method}) is at or above the floor {Numbers.Format(floor)}");

    public static string RunsNotApplicable(int plus, int minus) => F($"runs test not applicable: {plus} positive and {minus} negative residuals");
}
