using System.Text.Json;
using SenseSplit.Tests.Cli;

namespace SenseSplit.Tests.Reports;

/// <summary>
/// senses.jsonl against docs/schema/senses.schema.json (JSON Schema, draft 2020-12). The checker below covers the
/// keywords that schema uses (type, enum, required, properties, items, minimum, maximum, minItems, maxItems,
/// additionalProperties); with <c>strict</c> it also rejects properties the schema does not declare, so that the
/// published schema stays complete.
/// </summary>
public class SensesSchemaTests
{
    private static JsonElement Schema()
    {
        string dir = AppContext.BaseDirectory;
        while (dir is not null && !File.Exists(Path.Combine(dir, "docs", "schema", "senses.schema.json"))) dir = Path.GetDirectoryName(dir)!;
        Assert.NotNull(dir);
        return JsonDocument.Parse(File.ReadAllText(Path.Combine(dir!, "docs", "schema", "senses.schema.json"))).RootElement;
    }

    [Fact]
    public void SensesJsonl_FixtureAuditWithCorpus_MatchesSchemaStrictly()
    {
        var (dir, _, _) = AuditCommandTests.RunFixtureAudit();
        var schema = Schema();
        var lines = File.ReadAllLines(Path.Combine(dir, "senses.jsonl"));
        Assert.NotEmpty(lines);
        bool sawExample = false, sawUnknown = false;
        foreach (var line in lines)
        {
            using var doc = JsonDocument.Parse(line);
            var errors = new List<string>();
            Check(schema, doc.RootElement, "$", errors, strict: true);
            Assert.True(errors.Count == 0, string.Join("\n", errors));
            sawUnknown |= doc.RootElement.GetProperty("verdict").GetString() == "unknown";
            sawExample |= doc.RootElement.GetProperty("senses").EnumerateArray().Any(s => s.GetProperty("examples").GetArrayLength() > 0);
        }
        Assert.True(sawExample && sawUnknown, "the fixture should exercise examples and an unknown term");
    }

    [Theory]
    [InlineData("{\"term\":\"x\"}", "missing")]
    [InlineData("{\"term\":\"x\",\"key\":\"x\",\"verdict\":\"maybe\",\"ambiguity\":0,\"peer_rank\":null,\"in_vocabulary\":true,\"composed\":false,\"count\":1,\"occurrences\":null,\"senses\":[],\"merges\":[],\"dropped\":[],\"notes\":[],\"close_spellings\":[],\"glossary\":{}}", "not one of")]
    [InlineData("{\"term\":\"x\",\"key\":\"x\",\"verdict\":\"single\",\"ambiguity\":2,\"peer_rank\":null,\"in_vocabulary\":true,\"composed\":false,\"count\":1,\"occurrences\":null,\"senses\":[],\"merges\":[],\"dropped\":[],\"notes\":[],\"close_spellings\":[],\"glossary\":{}}", "above")]
    [InlineData("{\"term\":\"x\",\"key\":\"x\",\"verdict\":\"single\",\"ambiguity\":0,\"peer_rank\":null,\"in_vocabulary\":true,\"composed\":false,\"count\":1.5,\"occurrences\":null,\"senses\":[],\"merges\":[],\"dropped\":[],\"notes\":[],\"close_spellings\":[],\"glossary\":{},\"extra\":1}", "integer")]
    public void Check_BrokenObjects_Rejected(string json, string expected)
    {
        using var doc = JsonDocument.Parse(json);
        var errors = new List<string>();
        Check(Schema(), doc.RootElement, "$", errors, strict: true);
        Assert.Contains(errors, e => e.Contains(expected, StringComparison.Ordinal));
    }

    private static void Check(JsonElement schema, JsonElement value, string path, List<string> errors, bool strict)
    {
        if (schema.TryGetProperty("type", out var type))
        {
            var allowed = type.ValueKind == JsonValueKind.Array ? type.EnumerateArray().Select(t => t.GetString()!).ToArray() : [type.GetString()!];
            if (!allowed.Any(t => Is(value, t))) { errors.Add($"{path}: {value.ValueKind} is not {string.Join("|", allowed)}"); return; }
        }
        if (schema.TryGetProperty("enum", out var en) && !en.EnumerateArray().Any(e => e.GetRawText() == value.GetRawText()))
            errors.Add($"{path}: {value.GetRawText()} is not one of {en.GetRawText()}");
        if (value.ValueKind == JsonValueKind.Number)
        {
            double x = value.GetDouble();
            if (schema.TryGetProperty("minimum", out var min) && x < min.GetDouble()) errors.Add($"{path}: {x} below {min.GetDouble()}");
            if (schema.TryGetProperty("maximum", out var max) && x > max.GetDouble()) errors.Add($"{path}: {x} above {max.GetDouble()}");
        }
        if (value.ValueKind == JsonValueKind.Array)
        {
            int n = value.GetArrayLength();
            if (schema.TryGetProperty("minItems", out var mi) && n < mi.GetInt32()) errors.Add($"{path}: {n} items, fewer than {mi.GetInt32()}");
            if (schema.TryGetProperty("maxItems", out var ma) && n > ma.GetInt32()) errors.Add($"{path}: {n} items, more than {ma.GetInt32()}");
            if (schema.TryGetProperty("items", out var items))
            {
                int i = 0;
                foreach (var item in value.EnumerateArray()) Check(items, item, $"{path}[{i++}]", errors, strict);
            }
        }
        if (value.ValueKind == JsonValueKind.Object)
        {
            if (schema.TryGetProperty("required", out var req))
                foreach (var r in req.EnumerateArray())
                    if (!value.TryGetProperty(r.GetString()!, out _)) errors.Add($"{path}: required property '{r.GetString()}' missing");
            schema.TryGetProperty("properties", out var props);
            schema.TryGetProperty("additionalProperties", out var extra);
            foreach (var p in value.EnumerateObject())
            {
                if (props.ValueKind == JsonValueKind.Object && props.TryGetProperty(p.Name, out var sub)) Check(sub, p.Value, $"{path}.{p.Name}", errors, strict);
                else if (extra.ValueKind == JsonValueKind.Object) Check(extra, p.Value, $"{path}.{p.Name}", errors, strict);
                else if (strict) errors.Add($"{path}: property '{p.Name}' is not in the schema");
            }
        }
    }

    private static bool Is(JsonElement v, string type) => type switch
    {
        "null" => v.ValueKind == JsonValueKind.Null,
        "boolean" => v.ValueKind is JsonValueKind.True or JsonValueKind.False,
        "string" => v.ValueKind == JsonValueKind.String,
        "array" => v.ValueKind == JsonValueKind.Array,
        "object" => v.ValueKind == JsonValueKind.Object,
        "number" => v.ValueKind == JsonValueKind.Number,
        "integer" => v.ValueKind == JsonValueKind.Number && v.TryGetInt64(out _),
        _ => false,
    };
}
