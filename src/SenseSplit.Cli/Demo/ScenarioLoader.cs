using System.Text.Json;
using SenseSplit.Core.Demo;

namespace SenseSplit.Cli.Demo;

/// <summary>Reads the built-in demo scenario (demo/scenario.json, embedded in the tool) or a user's own file of the same shape.</summary>
public static class ScenarioLoader
{
    private static readonly JsonSerializerOptions Options = new() { PropertyNameCaseInsensitive = true };

    public static DemoScenario BuiltIn()
    {
        using var stream = typeof(ScenarioLoader).Assembly.GetManifestResourceStream("SenseSplit.Demo.scenario.json")
            ?? throw new InvalidOperationException("the built-in demo scenario is missing from the tool");
        return Parse(stream, "built-in scenario");
    }

    public static DemoScenario FromFile(string path)
    {
        if (!File.Exists(path)) throw new UserFacingException($"{path}: no such scenario file");
        using var stream = File.OpenRead(path);
        return Parse(stream, path);
    }

    private static DemoScenario Parse(Stream stream, string name)
    {
        try
        {
            var scenario = JsonSerializer.Deserialize<DemoScenario>(stream, Options)
                ?? throw new UserFacingException($"{name}: empty scenario");
            if (scenario.Topics is null || scenario.Terms is null || scenario.FunctionWords is null || scenario.Glossary is null)
                throw new UserFacingException($"{name}: a scenario needs functionWords, topics, terms and glossary");
            return scenario;
        }
        catch (JsonException ex)
        {
            throw new UserFacingException($"{name}: line {ex.LineNumber + 1}: {ex.Message}");
        }
    }
}
