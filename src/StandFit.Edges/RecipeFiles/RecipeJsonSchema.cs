using System.Text.Json;
using System.Text.Json.Nodes;

namespace StandFit.Edges.RecipeFiles;

/// <summary>
/// Writes the JSON Schema (draft-07, which YAML editors' language servers read) of the recipe
/// language from <see cref="RecipeSchema"/>. The committed config/recipe.schema.json must equal
/// <see cref="Generate"/>; a test keeps them in sync.
/// </summary>
public static class RecipeJsonSchema
{
    private static readonly JsonSerializerOptions Indented = new() { WriteIndented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping };

    public static string Generate()
    {
        var body = Object(RecipeSchema.Root);
        var root = new JsonObject
        {
            ["$schema"] = "http://json-schema.org/draft-07/schema#",
            ["$id"] = "standfit-recipe.schema.json",
            ["title"] = "StandFit recipe",
        };
        foreach (var (key, value) in body.ToList())
        {
            body.Remove(key);
            if (key != "required")
            {
                root[key] = value;
            }
            else
            {
                // A recipe that extends a family inherits its keys: the required ones are then optional.
                root["if"] = new JsonObject { ["required"] = new JsonArray("extends") };
                root["then"] = new JsonObject();
                root["else"] = new JsonObject { ["required"] = value };
            }
        }

        return root.ToJsonString(Indented).Replace("\r\n", "\n", StringComparison.Ordinal) + "\n";
    }

    private static JsonObject Object(KeySpec spec)
    {
        var properties = new JsonObject();
        foreach (var child in spec.Children)
        {
            properties[child.Name] = Node(child);
        }

        var node = new JsonObject
        {
            ["type"] = "object",
            ["description"] = spec.Description,
            ["properties"] = properties,
            ["additionalProperties"] = false,
        };
        var required = spec.Children.Where(c => c.Required).Select(c => (JsonNode?)JsonValue.Create(c.Name)).ToArray();
        if (required.Length > 0)
        {
            node["required"] = new JsonArray(required);
        }

        return node;
    }

    private static JsonNode Node(KeySpec spec)
    {
        switch (spec.Kind)
        {
            case ValueKind.Map:
                return Object(spec);
            case ValueKind.NamedMaps:
                var inner = Object(spec);
                inner.Remove("description");
                return new JsonObject
                {
                    ["type"] = "object",
                    ["description"] = spec.Description,
                    ["additionalProperties"] = inner,
                };
            case ValueKind.TextOrList:
                return new JsonObject
                {
                    ["description"] = spec.Description,
                    ["oneOf"] = new JsonArray(
                        new JsonObject { ["type"] = "string", ["minLength"] = 1 },
                        new JsonObject { ["type"] = "array", ["items"] = new JsonObject { ["type"] = "string", ["minLength"] = 1 }, ["minItems"] = 1 }),
                };
            case ValueKind.TextList:
                var item = new JsonObject { ["type"] = "string", ["minLength"] = 1 };
                if (!spec.Choices.IsDefaultOrEmpty)
                {
                    item["enum"] = new JsonArray([.. spec.Choices.Select(c => (JsonNode?)JsonValue.Create(c))]);
                }

                return new JsonObject { ["type"] = "array", ["description"] = spec.Description, ["items"] = item, ["minItems"] = 1 };
            default:
                var scalar = new JsonObject
                {
                    ["type"] = spec.Kind switch { ValueKind.Number => "number", ValueKind.Integer => "integer", ValueKind.Boolean => "boolean", _ => "string" },
                    ["description"] = spec.Description,
                };
                if (spec.Kind == ValueKind.Text)
                {
                    scalar["minLength"] = 1;
                }

                if (!spec.Choices.IsDefaultOrEmpty)
                {
                    scalar["enum"] = new JsonArray([.. spec.Choices.Select(c => (JsonNode?)JsonValue.Create(c))]);
                }

                if (spec.Minimum is { } min)
                {
                    scalar[spec.ExclusiveMinimum ? "exclusiveMinimum" : "minimum"] = min;
                }

                if (spec.Maximum is { } max)
                {
                    scalar[spec.ExclusiveMaximum ? "exclusiveMaximum" : "maximum"] = max;
                }

                return scalar;
        }
    }
}
