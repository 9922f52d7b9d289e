using System.Globalization;

namespace StandFit.Core.Problems;

/// <summary>
/// Every message the tool shows about user input, in one place, so wording stays consistent and
/// each one says what is wrong and how to fix it.
/// </summary>
public static class Messages
{
    private static string F(FormattableString s) => s.ToString(CultureInfo.InvariantCulture);

    private static string Separator(char c) => c == '\t' ? "tab" : c.ToString();

    // ---- sweep files -------------------------------------------------------------------------
    public static string BadShard(string text, int maxCount) => F($"--shard '{text}' is not a shard: write I/N with N from 1 to {maxCount} and I from 0 to N-1 (0-based, as a Kubernetes Indexed Job's JOB_COMPLETION_INDEX), for example --shard 0/4.");

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
    public static string BadNumber(string column, string shown, char decimalSeparator = '.') => decimalSeparator == ','
        ? F($"'{shown}' in column '{column}' is not a number (this recipe declares a decimal comma: numbers use ',', no thousands separator). Fix the row or re-export.")
        : F($"'{shown}' in column '{column}' is not a number (numbers use a decimal point, no thousands separator). Fix the row or re-export.");
    public static string TruncatedLastRow() => "the last data row has no line end: the file was cut off while it was being written (or the export stopped), so its last number may be cut short. Re-export the sweep; stands should write under a temporary name and rename.";
    public static string WrongSeparator(char expected, char found) => F($"the header has no '{Separator(expected)}' between column names but holds '{Separator(found)}': the file was exported in another format. Export with '{Separator(expected)}' between cells, or, for a decimal-comma export (';' between cells), declare 'decimal_separator: comma' in the part's recipe.");
    public static string Duplicate(string firstAt, string firstFile, string ruling) => F($"the same bytes were judged at {firstAt} under the same recipe (file {firstFile} of the same batch, ruled {ruling}); the file was not judged again and adds no summary row. Remove the duplicate export, or change the recipe to judge it anew.");
    public static string DuplicateOfPublished(string firstAt, string ruling, string unitKey) => F($"the same bytes were judged at {firstAt} under the same recipe (ruled {ruling}; its summary row has unit_key {unitKey}); the file was not judged again and adds no summary row. Remove the duplicate export, or change the recipe to judge it anew.");
    public static string NonFinite(string column, string shown) => F($"'{shown}' in column '{column}' is not a finite number. The stand recorded no valid reading here; re-run the sweep.");
    public static string BadLeg(string column, string shown) => F($"'{shown}' in leg column '{column}' must be 'up' or 'down'. Fix the row or the recipe's 'columns: leg'.");
    public static string NoRecipe(string key, string value) => F($"no recipe lists {key} '{value}'. Add the part to a recipe's 'parts' list; the unit was not judged.");
    public static string NoPartMetadata(string key) => F($"the file has no '# {key}: ...' line, so no recipe can be chosen. Add the line to the stand's export.");

    // ---- recipes and configuration -----------------------------------------------------------
    public static string RecipeYamlSyntax(string detail) => F($"this is not valid YAML: {detail.TrimEnd().TrimEnd('.')}. Check indentation and colons near this place.");
    public static string RecipeMultipleDocuments() => "a recipe file holds one YAML document; remove the second '---' and what follows, or move it to its own file.";
    public static string RecipeAliasRefused() => "anchors and aliases ('&name', '*name') are not supported in recipes; write the values out.";
    public static string RecipeTagRefused(string tag) => F($"YAML tags such as '{tag}' are not supported in recipes; remove the tag.");
    public static string RecipeComplexKey() => "a key must be plain text.";
    public static string RecipeUtf16File() => "the recipe file is UTF-16 text; recipe files must be UTF-8. Save it as UTF-8 in your editor.";
    public static string RecipeNotText(int offset) => F($"byte {offset} is a NUL or control byte: the file is not UTF-8 text (UTF-16 without a byte-order mark, or not text at all). Save the recipe as UTF-8 text.");
    public static string RecipeInvalidUtf8(int offset) => F($"byte {offset} is not valid UTF-8 (a legacy code page such as Windows-1252?); recipe files must be UTF-8. Save the file as UTF-8 in your editor and check the characters here.");
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
    public static string DecisionNeeded() => "the recipe has limits but no 'decision' section; say 'decision: { rule: guarded }' or 'rule: simple' so the decision rule is agreed, not assumed.";
    public static string CoverageWithoutGuarded(string where) => F($"{where} gives a coverage factor but the rule is 'simple'; remove 'coverage_factor' or use 'rule: guarded'.");
    public static string DerivedNeedsOneKey(string where) => F($"{where} needs exactly one of 'sensitivity_at', 'value_at', 'band_at' or 'inverse_at'.");
    public static string RecipeBadExpression(string where, int column, string excerpt, string message) => column > 0
        ? F($"{where}, column {column} of the expression ('{excerpt}'): {message}")
        : F($"{where} ('{excerpt}'): {message}");
    public static string RecipeExpressionNotAnInput(string where, int column, string name, IEnumerable<string> inputs) =>
        F($"{where}, column {column} of the expression: '{name}' is not a stimulus input of this recipe; the inputs are {string.Join(", ", inputs)} (one per 'columns.stimulus' column, in order). Fix the name, or name the column under 'columns.stimulus'.");
    public static string RecipeExpressionUndeclared(string where, int column, string name, IEnumerable<string> declared, string? suggestion) =>
        F($"{where}, column {column} of the expression: '{name}' is used but is not declared under 'model.parameters' (declared: {string.Join(", ", declared)}).{(suggestion is null ? "" : $" Did you mean '{suggestion}'?")} Declare it with a start value, or fix the name.");
    public static string RecipeParameterUnused(string path, string expression) => F($"{path} is declared, but the expression '{expression.ReplaceLineEndings(" ")}' does not use it, so it could not be fitted. Remove it or use it.");
    public static string RecipeBadParameterName(string path, string name, bool reserved, bool input) => input
        ? F($"{path}: '{name}' is the name of a stimulus input (x, x1, x2 ...), not a parameter; choose another name.")
        : reserved
            ? F($"{path}: '{name}' is a function or constant of the expression language; choose another name.")
            : F($"{path}: '{name}' is not a parameter name; use a letter or '_' followed by letters, digits or '_' (at most 64).");
    public static string RecipeStartOutsideBounds(string path, string start, double? min, double? max) =>
        F($"{path} is {start}, outside the parameter's bounds [{(min is { } lo ? Numbers.Format(lo) : "-inf")}, {(max is { } hi ? Numbers.Format(hi) : "inf")}]; the search must start inside them.");
    public static string RecipeParametersEmpty(string path) => F($"{path} declares no parameter; declare each parameter of the expression with its start value, for example R25: {{ start: 10000 }}.");
    public static string RecipeNotForExpression(string what) => F($"{what} cannot be used with model type 'expression': it needs a model linear in its parameters (weights, the curvature test of the next polynomial power). Remove it, or use a linear model type.");
    public static string RecipeDerivedOneInput(string path, int inputs) => F($"{path} is a point on a curve of one stimulus, but the recipe names {inputs} stimulus columns; derived figures need a model of one input.");
    public static string RecipeCurveUseNeedsRule(string path) => F($"{path} needs the standard uncertainty of a new reading, which a weighted fit takes from the recipe's rule; 'weights.column' gives it only for the sweep's own readings. Use 'weights: {{ u_fixed: ..., u_relative: ... }}', or a value_at figure.");
    public static string RecipeCurveUseTransformed(string path, string model) => F($"{path} on a weighted '{model}' fit would need a new reading's uncertainty on the fitted response's scale, which the weight rule does not give; remove the weights or use a value_at figure.");
    public static string DerivedNameClash(string name) => F($"derived figure '{name}' has the name of a figure the fit already produces; choose another name.");
    public static string PartsNeeded() => "a recipe that is not 'family: true' needs 'parts' (the part numbers it judges).";
    public static string FamilyNotFound(string name, IEnumerable<string> known)
    {
        var families = string.Join(", ", known);
        return families.Length > 0
            ? F($"'extends: {name}' names no family recipe in this folder; the family recipes are: {families}.")
            : F($"'extends: {name}' names no family recipe in this folder, and the folder holds none at all (a family recipe says 'family: true'). Add the family's file to the folder, or remove 'extends'.");
    }

    public static string FamilyCycle(string name) => F($"'extends: {name}' leads back to this recipe; a family chain must end.");
    public static string NotAnInteger(string where, string shown) => F($"{where} must be a whole number, not '{shown}'.");
    public static string OutOfRange(string where, string shown, string range) => F($"{where} is {shown}; it must be {range}.");
    public static string UnknownChoice(string where, string shown, IEnumerable<string> choices, string? suggestion) =>
        suggestion is not null
            ? F($"{where} is '{shown}'; did you mean '{suggestion}'? The choices are: {string.Join(", ", choices)}.")
            : F($"{where} is '{shown}'; the choices are: {string.Join(", ", choices)}.");
    public static string MinAboveMax(string where, string min, string max) => F($"{where} has min {min} above max {max}; swap them or fix one.");
    public static string EmptyRange(string where, string value) => F($"{where} has min and max both {value}, which is no range at all; make min the lower end and max the upper end.");
    public static string LimitNeedsBound(string where) => F($"{where} needs 'min', 'max' or both.");
    public static string UnknownFigure(string figure, string model, IEnumerable<string> modelFigures, string? suggestion) =>
        F($"limit on '{figure}', but model {model} produces no such figure{(suggestion is null ? "" : F($" (did you mean '{suggestion}'?)"))}; the model's own figures are: {string.Join(", ", modelFigures)}. The fit figures, residual diagnostics and figures of merit every model has are listed in docs/recipes.md, 'Figures a limit can name'.");
    public static string DegreeWithoutPolynomial(string model) => KeyNotForModel("degree", "polynomial", model);
    public static string KeyNotForModel(string key, string owner, string model) => F($"'{key}' applies only to model type '{owner}', not '{model}'; remove it or change the type.");
    public static string ModelTakesOneInput(string model, int inputs) => F($"model type '{model}' takes one stimulus column, but 'columns.stimulus' names {inputs}; name one column, or use type 'basis' for a model of several inputs.");
    public static string TooManyInputs(int inputs, int limit) => F($"'columns.stimulus' names {inputs} columns; at most {limit} are allowed.");
    public static string DuplicateInput(string column, int first) => F($"column '{column}' is already stimulus {first} (header names are matched ignoring case); name each stimulus column once.");
    public static string ColumnInTwoRoles(string column, string role, string firstRole) => F($"column '{column}' is named as the {role} column, but it is already the {firstRole} column (header names are matched ignoring case); a column has one role. Name the right column for each.");
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
    public static string BadWorkerId(string shown) => F($"'watch.worker_id' is '{shown}'; it names files, so it must be 1 to 64 characters of A-Z, a-z, 0-9, '.', '_' and '-', not starting with '.'.");
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
    public static string ZeroInputSpread(string column, double value) => F($"every value of input column '{column}' is {Numbers.Format(value)}: the stand did not vary it, so its terms cannot be told from the constant. Check the stand, or drop the input from the model.");
    public static string Collinear(int parameters) => F($"the model's {parameters} terms cannot be told apart on this sweep (the design matrix is singular to working precision). Check the model's terms and the sweep plan.");
    public static string OutsideDomain(string column, string symbol, double value, string condition) => F($"{symbol} (column '{column}') is {Numbers.Format(value, 10)} on this line, but {condition}: the model cannot use this point. Check the reading, or choose a model whose terms admit it.");
    public static string ResponseOutsideDomain(double value, string condition) => F($"the output is {Numbers.Format(value, 10)} on this line, but {condition}. Check the reading and the recipe's 'model.temperature' unit.");
    public static string BadUncertainty(double value) => F($"the output's standard uncertainty is {Numbers.Format(value)} on this line; a weight 1/u^2 needs an uncertainty above 0. Check the uncertainty column or the recipe's 'weights' rule.");
    public static string NonFiniteFit() => "the fit produced a non-finite number; the data are out of range for this model. Check the data and the model.";
    public static string InternalError(string exceptionType) => F($"the tool failed on this unit ({exceptionType}); the operations log has the details. Please report it.");

    // ---- the publish journal and its index files (docs/outputs.md#the-journal) ----------------
    private const string JournalRemedy = "Restore the journal folder from a backup, or move the worker's journal and its index files (WORKER.jsonl, WORKER.*.idx) aside to start anew (earlier units are then no longer known as duplicates).";

    public static string OutputFolderMissing(string folder) => F($"The output folder {folder} does not exist.");
    public static string JournalDamagedLine(int line, string journal, string detail) => F($"Line {line} of the journal {journal} is damaged ({detail}). It is not the last line, so it was not a crash in mid-write; the journal was edited. {JournalRemedy}");
    public static string JournalHeaderNotFirst() => "an index header line is only valid as the first line";
    public static string JournalIndexFileMissing(string journal, string file) => F($"The journal {journal} names the index file {file}, which is missing: the keys it held are lost. {JournalRemedy}");
    public static string JournalIndexFileDamaged(string journal, string detail) => F($"An index file the journal {journal} names is damaged: {detail}. {JournalRemedy}");
    public static string IndexFileNoFooter(string file, long bytes) => F($"{file} ({bytes} bytes) does not end in an index footer");
    public static string IndexFileWrongLength(string file, long bytes, long keys, long serials, long expected) => F($"{file} has {bytes} bytes, but its footer counts {keys} keys and {serials} serials, which take {expected}");
    public static string IndexFileChecksum(string file) => F($"{file} does not match its checksum");
    public static string IndexFileForeignName(string file, string workerId) => F($"'{file}' is not the name of an index file of worker {workerId}");

    // ---- model expressions (docs/expressions.md) ---------------------------------------------
    public static string ExpressionEmpty() => "the expression is empty; write the model, for example R25*exp(beta*(1/x - 1/298.15)).";
    public static string ExpressionTooLong(int length, int limit) => F($"the expression has {length} characters, over the limit of {limit}. Shorten it.");
    public static string ExpressionTooDeep(int limit) => F($"the expression nests more than {limit} levels deep (parentheses, functions, signs and powers each add one). Simplify it.");
    public static string ExpressionUnexpectedCharacter(string shown) => F($"{shown} is not part of the expression language; use numbers, names, + - * / ^ ** and parentheses.");
    public static string ExpressionBadNumber(string shown) => F($"'{shown}' is not a number; a number has digits, an optional decimal point and an optional exponent (2, 0.5, 1.5E-3).");
    public static string ExpressionNumberNotFinite(string shown) => F($"the number {shown} is too large for a double. Write it with a smaller exponent.");
    public static string ExpressionExpectedOperand(string found) => F($"expected a number, a name, a function or '(' here, but found {found}.");
    public static string ExpressionExpectedOperator(string found) => F($"expected an operator (+ - * / ^) before {found}; multiplication is never implied: write 2*x, not 2x.");
    public static string ExpressionExpectedOperatorOrClose(string found, char close) => F($"expected an operator or '{close}' before {found}.");
    public static string ExpressionUnclosed(char open, int column) => F($"the '{open}' at column {column} is never closed. Add the closing bracket.");
    public static string ExpressionUnmatchedClose(char close) => F($"this '{close}' has no opening bracket before it. Remove it or add the opening one.");
    public static string ExpressionMismatchedClose(char open, int openColumn, char close) => F($"'{close}' closes the '{open}' at column {openColumn}; brackets close with their own kind: ( ) or [ ].");
    public static string ExpressionFunctionNeedsArgument(string name) => F($"'{name}' is a function: write its argument in parentheses, {name}(...).");
    public static string ExpressionNotAFunction(string name, IEnumerable<string> functions) => F($"'{name}' is not a function, and a name followed by '(' must be one. The functions are: {string.Join(", ", functions)}. For a product write {name}*(...).");
    public static string ExpressionUnknownName(string name, IEnumerable<string> parameters, IEnumerable<string> variables) => F($"'{name}' is neither a parameter ({string.Join(", ", parameters)}) nor a variable ({string.Join(", ", variables)}). Fix the name or add it to the parameters.");
    public static string ExpressionTooManyParameters(int count, int limit) => F($"the expression has {count} parameters, over the limit of {limit}.");
    public static string ExpressionTooManyVariables(int count, int limit) => F($"{count} variables are given, over the limit of {limit}.");
    public static string ExpressionNoParameters() => "the expression names no parameter to fit; write the model with its parameters, for example b1*exp(-b2*x).";
    public static string ExpressionUnusedParameter(string name) => F($"parameter '{name}' is listed but the expression does not use it; it could not be fitted. Remove it from the list or use it.");
    public static string ExpressionBadName(string name, string role, bool reserved) => reserved
        ? F($"'{name}' cannot be a {role} name: the expression language uses it (a function or pi). Choose another name.")
        : F($"'{name}' is not a valid {role} name: use an ASCII letter or '_' followed by letters, digits or '_', at most 64 characters.");
    public static string ExpressionDuplicateName(string name) => F($"'{name}' is given twice among the variables and parameters; each name must be one thing.");
    public static string ExpressionConstantNotFinite() => "this constant part of the expression has no finite value (a division by zero, or a function outside its domain). Fix it.";
    public static string ExpressionEndDescription() => "the end of the expression";
    public static string ExpressionNumberDescription(string shown) => F($"the number {shown}");
    public static string ExpressionNameDescription(string shown) => F($"the name '{shown}'");

    // ---- nonlinear fits -----------------------------------------------------------------------
    public static string NonlinearConvergedRss(int iterations, double tolerance) => F($"converged after {iterations} iterations: a step changed the residual sum of squares by less than {Numbers.Format(tolerance, 3)} relative (actual and predicted)");
    public static string NonlinearConvergedStep(int iterations, double tolerance) => F($"converged after {iterations} iterations: the step bound fell below {Numbers.Format(tolerance, 3)} of the scaled size of the parameters");
    public static string NonlinearConvergedGradient(int iterations, double tolerance) => F($"converged after {iterations} iterations: the residuals are orthogonal to every Jacobian column to within a cosine of {Numbers.Format(tolerance, 3)}");
    public static string NonlinearMaxIterations(int limit) => F($"did not converge: stopped at the limit of {limit} iterations, and the estimates are not a solution. Check the start values and the model.");
    public static string NonlinearNonFinite(int iterations) => F($"did not converge: the model or its derivatives were not finite (NaN or infinite) after {iterations} iterations, at the start values or at the point reached. Check the start values and the model's domain (ln, sqrt and powers of negative numbers, division by zero).");
    public static string NonlinearSingularJacobian(int iterations, double condition) => F($"no solution with error bars: after {iterations} iterations the search stopped where the Jacobian is singular (condition number {Numbers.Format(condition, 3)}), so the data cannot separate the parameters. Check the model, its parameters and the sweep.");
    public static string NonlinearFitRejected(string status, int iterations, string reason) => F($"the nonlinear fit stopped with status {status} after {iterations} iterations; {reason}");
    public static string NonlinearNotFiniteResult(string status, int iterations) => F($"the nonlinear fit ended ({status}, {iterations} iterations) with an estimate, standard error or residual that is not a finite number; no result is reported. Check the start values, the bounds and the model's domain.");
    public static string NonlinearAtBound(string parameter, string side, double bound, int iterations) => F($"the nonlinear fit ended after {iterations} iterations with '{parameter}' on its {side} bound {Numbers.Format(bound, 6)}: the estimate is held by the bound, so it and its standard error describe no least-squares solution. Check the unit, or the recipe's bounds.");

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

    /// <summary>
    /// A runs gate's finding: <paramref name="p"/> is the test's p-value (exact or normal, as
    /// <paramref name="method"/> says) and <paramref name="judged"/> the mid-p the gate judges (the
    /// same value for the normal approximation).
    /// </summary>
    public static string RunsFinding(int runs, int plus, int minus, double expected, double z, double p, double judged, string method, double floor, bool structure, string order = "stimulus order") =>
        structure
            ? F($"runs test in {order}: {runs} runs of {plus}+/{minus}- signs (expected {Numbers.Format(expected, 4)}, z = {Numbers.Format(z, 3)}), {RunsP(p, judged, method)} is below the floor {Numbers.Format(floor)}: the residuals have structure")
            : F($"runs test in {order}: {runs} runs of {plus}+/{minus}- signs (expected {Numbers.Format(expected, 4)}, z = {Numbers.Format(z, 3)}), {RunsP(p, judged, method)} is at or above the floor {Numbers.Format(floor)}");

    private static string RunsP(double p, double judged, string method) =>
        method == "exact" ? F($"exact p = {Numbers.Format(p, 3)}, mid-p = {Numbers.Format(judged, 3)}") : F($"p = {Numbers.Format(judged, 3)} ({method})");

    /// <summary>The per-leg runs gate: each leg's runs and p, then the stratified test within legs, whose mid-p is judged.</summary>
    public static string RunsPerLegFinding(string legs, int tested, int runs, double expected, double z, double p, double judged, string method, double floor, bool structure) =>
        structure
            ? F($"runs test within legs ({legs}): {runs} runs in {tested} leg(s) (expected {Numbers.Format(expected, 4)}, z = {Numbers.Format(z, 3)}), {RunsP(p, judged, method)} is below the floor {Numbers.Format(floor)}: the residuals have structure within the legs")
            : F($"runs test within legs ({legs}): {runs} runs in {tested} leg(s) (expected {Numbers.Format(expected, 4)}, z = {Numbers.Format(z, 3)}), {RunsP(p, judged, method)} is at or above the floor {Numbers.Format(floor)}");

    /// <summary>One leg's part of <see cref="RunsPerLegFinding"/>.</summary>
    public static string RunsLeg(string leg, int runs, int plus, int minus, double p) =>
        F($"{leg}: {runs} runs of {plus}+/{minus}-, p = {Numbers.Format(p, 3)}");

    /// <summary>One leg's part of <see cref="RunsPerLegFinding"/> where the test does not apply.</summary>
    public static string RunsLegNotApplicable(string leg, int plus, int minus) => F($"{leg}: not applicable ({plus}+/{minus}-)");

    public static string RunsPerLegNotApplicable() => F($"runs test per leg not applicable: no leg has residuals of both signs among at least three");

    public static string RunsNotApplicable(int plus, int minus) => F($"runs test not applicable: {plus} positive and {minus} negative residuals");

    // ---- resampling --------------------------------------------------------------------------
    public static string LimitIntervalMissing(string figure, string interval) => F($"the limit on '{figure}' cannot decide: its {interval} interval could not be formed for this unit (too few successful resamples, or a jackknife deletion that cannot be fitted)");

    public static string LimitDecisionOnInterval(Judging.LimitResult r, string unit, string basis)
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
        var subject = F($"{r.Figure} {N(r.Value)}{u}, interval [{N(r.Low)}, {N(r.High)}]");
        return r.Zone switch
        {
            Judging.LimitZone.Above => F($"{subject} lies above the upper limit {N(r.Max!.Value)} (guarded, {basis})"),
            Judging.LimitZone.Below => F($"{subject} lies below the lower limit {N(r.Min!.Value)} (guarded, {basis})"),
            Judging.LimitZone.Straddles => F($"{subject} straddles a limit of {limits} (guarded, {basis}): undecided, conditional {r.Conditional}"),
            _ => F($"{subject} lies inside the limits {limits} (guarded, {basis})"),
        };
    }

    public static string IntervalBasisBootstrap(string kind, string scheme, int succeeded, double coverage) => F($"bootstrap {kind}, {scheme} resampling, {succeeded} resamples, {Numbers.Format(coverage * 100, 6)} %");

    public static string IntervalBasisJackknife(string groups, int deletions, double coverage) => F($"jackknife {groups}, {deletions} deletions, t({Numbers.Format(coverage * 100, 6)} %, {deletions - 1} df) SE");

    /// <summary>The counts of a nonlinear model's causes (<paramref name="notConverged"/>, <paramref name="atBound"/>) are named only when one of them is not 0.</summary>
    public static string TooManyFailedResamples(int failed, int requested, double percent, double maxPercent, int degenerate, int rankDeficient, int nonFinite, int notConverged = 0, int atBound = 0, int noRoot = 0, int severalRoots = 0) =>
        F($"{failed} of {requested} bootstrap resamples could not be fitted ({Numbers.Format(percent, 4)} %, over the recipe's max_failed_percent {Numbers.Format(maxPercent)}): {degenerate} with no stimulus spread, {rankDeficient} rank deficient, {nonFinite} non-finite{(notConverged + atBound > 0 ? F($", {notConverged} not converged within the iteration limit, {atBound} on a parameter bound") : "")}{(noRoot + severalRoots > 0 ? F($", {noRoot} whose curve does not reach an inverse_at figure's output in the calibrated range, {severalRoots} whose curve reaches it more than once") : "")}; the bootstrap figures rest on too few resamples. Test the unit again, or use a sweep with more points per set point{(notConverged + atBound > 0 ? " and across the whole range of the curve" : "")}{(noRoot + severalRoots > 0 ? ", or an inverse_at output further inside the curve's range" : "")}");

    public static string InfluentialPoint(string figure, int line, double stimulus, double shift, string unit, double shiftInSe, int deletions) =>
        F($"delete-one jackknife of {figure}: the point on line {line} (stimulus {Numbers.Format(stimulus)}) moves it most; leaving it out changes {figure} by {Numbers.Format(shift, 4)}{(unit.Length == 0 ? "" : " " + unit)} ({Numbers.Format(shiftInSe, 3)} jackknife SE, of {deletions} points)");

    public static string IntervalWithoutGuarded(string where) => F($"{where} names an 'interval' but the rule is 'simple', which judges the estimate alone; remove 'interval' or use 'rule: guarded'.");

    public static string IntervalWithCoverage(string where, string interval) => F($"{where} judges the {interval} interval and also gives a 'coverage_factor'; a resampling interval has no coverage factor. Remove one of them.");

    public static string ResamplingNeeded(string figure) => F($"the limit on '{figure}' judges a resampling interval, but the recipe has no 'resampling' section; add 'resampling: {{ seed: ..., bootstrap: ..., resamples: ..., max_failed_percent: ... }}'.");

    public static string BootstrapKeyNeeded(string key, string figure, string interval) => F($"'resampling' needs '{key}' written out because the limit on '{figure}' judges its {interval} interval; the ruling must not rest on a default.");

    public static string JackknifeNoInverse(int line, bool several) =>
        F($"delete-one jackknife: leaving out the point on line {line} gives a curve that {(several ? "reaches an inverse_at figure's output more than once" : "does not reach an inverse_at figure's output")} in the calibrated range, so the jackknife figures and the BCa intervals are not available");

    public static string JackknifeUnavailable(string figure, int line) =>
        F($"delete-one jackknife of {figure}: leaving out the point on line {line} leaves a sweep that cannot be fitted, so the jackknife figures and the BCa intervals are not available");

    // ---- diagnostic gates -----------------------------------------------------------------------
    private static string Floor(double p, double floor, bool below) =>
        below ? F($"p = {Numbers.Format(p, 3)} is below the floor {Numbers.Format(floor)}") : F($"p = {Numbers.Format(p, 3)} is at or above the floor {Numbers.Format(floor)}");

    public static string DurbinWatsonFinding(double d, double p, double floor, bool below, string order = "in acquisition order") =>
        below
            ? F($"Durbin-Watson d = {Numbers.Format(d, 4)} on the residuals {order}, exact one-sided {Floor(p, floor, below)}: neighbouring residuals are alike (a drift, or a trend the model misses); check the stand and the model")
            : F($"Durbin-Watson d = {Numbers.Format(d, 4)} on the residuals {order}, exact one-sided {Floor(p, floor, below)}");

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

    public static string HeteroscedasticityFinding(double bp, int df, double f, int df2, double p, double floor, bool below) =>
        below
            ? F($"Breusch-Pagan (studentized) BP = {Numbers.Format(bp, 4)} on {df} df, F form {Numbers.Format(f, 4)} on {df} and {df2} df, {Floor(p, floor, below)}: the scatter of the residuals changes along the sweep")
            : F($"Breusch-Pagan (studentized) BP = {Numbers.Format(bp, 4)} on {df} df, F form {Numbers.Format(f, 4)} on {df} and {df2} df, {Floor(p, floor, below)}");

    public static string OutlierFinding(double r, int point, int line, int df, double p, double floor, bool below) =>
        below
            ? F($"the largest studentized residual |t| = {Numbers.Format(r, 4)} (point {point}, line {line}) on {df} df, Bonferroni {Floor(p, floor, below)}: that reading is an outlier; check the stand and the unit, and test again")
            : F($"the largest studentized residual |t| = {Numbers.Format(r, 4)} (point {point}, line {line}) on {df} df, Bonferroni {Floor(p, floor, below)}");

    public static string DiagnosticNotApplicable(string test) => F($"the {test} cannot be made on this fit (too few points or set points, no replicates, or no scatter left); the gate does not judge");

    // ---- the morning report ------------------------------------------------------------------
    public static string ReportFileUnreadable(string file, string why) => F($"{file} cannot be read ({why}); its rows are left out of this report. Check the file (a copy cut short, or written by another tool) and restore it from a backup if it was damaged.");
    public static string ReportBadDate(string option, string shown) => F($"{option} '{shown}' is not a date; write it as YYYY-MM-DD (a UTC date of test start, as the date= folders name them).");
    public static string ReportDatesReversed(string from, string to) => F($"--from {from} is after --to {to}; give the earlier date first.");
    public static string ReportNoOutputFolder(string folder) => F($"the output folder '{folder}' does not exist; give the folder that holds summaries/ (the configuration's folders.output).");
    public static string CompactBadTable(string shown) => F($"--table '{shown}' is not a table; the choices are: summaries, points, runs, all.");
    public static string CompactBadMinAge(string shown) => F($"--min-age '{shown}' is not a number of minutes from 0 to 10080 (a week); files written less than this long ago are not merged.");
    public static string CompactNoTable(string folder) => F($"'{folder}' holds none of summaries/, points/ or runs/, so it is not a StandFit output folder (or nothing was published yet); give the configuration's folders.output.");
    public static string ReportNoSummaries(string folder) => F($"'{folder}' holds no summaries/ folder, so it is not a StandFit output folder (or nothing was published yet); give the folder that holds summaries/.");
}
