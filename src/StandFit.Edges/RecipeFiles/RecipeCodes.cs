namespace StandFit.Edges.RecipeFiles;

/// <summary>Codes of recipe and configuration problems (shown by <c>recipes check</c> and at start-up).</summary>
public static class RecipeCodes
{
    public const string Syntax = "recipe.syntax";
    public const string UnknownKey = "recipe.unknown_key";
    public const string DuplicateKey = "recipe.duplicate_key";
    public const string MissingKey = "recipe.missing_key";
    public const string BadValue = "recipe.bad_value";
    public const string YamlTrap = "recipe.yaml_trap";
    public const string Contradiction = "recipe.contradiction";
    public const string UnknownFigure = "recipe.unknown_figure";
    public const string DuplicatePart = "recipe.duplicate_part";
    public const string Unreadable = "recipe.unreadable";
    public const string UnknownFamily = "recipe.unknown_family";
    public const string BadExpression = "recipe.bad_expression";
}
